/**
 * A cache of fits keyed by the *content* of their inputs, bounded by the bytes it really keeps.
 * A hash picks the candidates; a hit is confirmed by the caller's comparison of every input cell,
 * bit for bit, against the stored key, so two inputs that collide in the hash never share a fit.
 *
 * Each entry's size is measured, not estimated: the stored key arrays plus what the value reports
 * it keeps (`bytesOf`, e.g. a fit's own arrays, its factor and every by-product computed so far).
 * By-products grow a fit after it was stored (the covariance, the leverage…), so the entry a call
 * used is measured again after the call. Least recently used entries are evicted while the total is
 * above the byte budget; there is no entry count, so many small fits stay cached together.
 */

export interface KeyParts {
  /** Numeric inputs, compared bit for bit (so −0 and 0 differ, as do NaN payloads). */
  readonly numbers: readonly Float64Array[];
  /** Byte inputs (cell kinds), compared exactly. */
  readonly bytes: readonly Uint8Array[];
  /** Scalar options (intercept, degree, orientation…). */
  readonly flags: string;
  /** The options and a sampled hash of the inputs other than y, for finding a fit of another y over the same design. */
  readonly design?: string;
  readonly designHash?: number;
  /** The converted inputs themselves, for callers that compare raw input against them. */
  readonly blocks?: readonly import("./values").Block[];
  /**
   * The key of the entry whose arrays this one borrows and does not count (another y over the same
   * x). The borrower is evicted with its lender, and a hit on it keeps the lender recent, so a
   * borrowed array is always counted by an entry in the cache.
   */
  readonly lender?: KeyParts;
}

interface Entry<V> {
  readonly hash: number;
  readonly key: KeyParts;
  size: number;
  /** Bytes borrowed from an evicted lender, carried by this entry from then on. */
  carried: number;
  readonly value: V;
}

export class ContentCache<V> {
  private readonly entries: Entry<V>[] = [];
  private total = 0;
  hits = 0;
  misses = 0;

  /**
   * @param maxBytes - the budget for keys and values together
   * @param bytesOf - bytes a value keeps alive now (measured from its arrays)
   */
  constructor(
    private maxBytes: number,
    private readonly bytesOf: (v: V) => number,
  ) {}

  /**
   * The value of the most recently used entry with this hash whose stored key `matches` says is
   * equal to the caller's input (content comparison, so a hash collision never returns another
   * input's value), or undefined. Counts a hit or a miss.
   */
  find(hash: number, matches: (key: KeyParts) => boolean): V | undefined {
    for (let i = 0; i < this.entries.length; i++) {
      const e = this.entries[i]!;
      if (e.hash === hash && matches(e.key)) {
        this.hits++;
        this.entries.splice(i, 1);
        if (e.key.lender) {
          const j = this.entries.findIndex((l) => l.key === e.key.lender);
          if (j >= 0) this.entries.unshift(...this.entries.splice(j, 1));
        }
        this.entries.unshift(e);
        return e.value;
      }
    }
    this.misses++;
    return undefined;
  }

  /** The most recent entry for which `pred` holds (no hit or miss counted, the order unchanged). */
  scan(pred: (key: KeyParts, value: V) => boolean): { key: KeyParts; value: V } | undefined {
    for (const e of this.entries) if (pred(e.key, e.value)) return { key: e.key, value: e.value };
    return undefined;
  }

  /** Store a value under `hash` with its key (see find), evicting the least recently used. */
  insert(hash: number, key: KeyParts, value: V): void {
    if (key.lender) {
      const j = this.entries.findIndex((l) => l.key === key.lender);
      if (j >= 0) this.entries.unshift(...this.entries.splice(j, 1));
    }
    const size = keySize(key) + this.bytesOf(value);
    this.entries.unshift({ hash, key, size, carried: 0, value });
    this.total += size;
    this.evict();
  }

  /**
   * Measure the most recently used entry again (a call computes by-products only on the fit it
   * used, which is then the most recent) and evict the least recently used entries while the total
   * is above the budget. The most recent entry always stays, even alone above the budget: it is the
   * fit the caller is using.
   */
  settle(): void {
    const e = this.entries[0];
    if (!e) return;
    const size = keySize(e.key) + e.carried + this.bytesOf(e.value);
    this.total += size - e.size;
    e.size = size;
    this.evict();
  }

  private evict(): void {
    while (this.total > this.maxBytes && this.entries.length > 1) {
      const e = this.entries.pop()!;
      this.total -= e.size;
      for (let i = this.entries.length - 1; i >= 0; i--) {
        const b = this.entries[i]!;
        if (b.key.lender !== e.key) continue;
        if (i > 0) {
          this.entries.splice(i, 1);
          this.total -= b.size;
        } else {
          // the entry in use stays; it now carries what it borrowed (over-counting its lender's y)
          b.carried += keySize(e.key);
          b.size += keySize(e.key);
          this.total += keySize(e.key);
        }
      }
    }
  }

  /** Change the budget (bytes); evicts at once when the new one is smaller. */
  setBudget(maxBytes: number): void {
    this.maxBytes = maxBytes;
    this.settle();
  }

  clear(): void {
    this.entries.length = 0;
    this.total = 0;
  }

  get size(): number {
    return this.entries.length;
  }

  /** Bytes accounted for, as of the last insert or settle. */
  get bytes(): number {
    return this.total;
  }

  get budget(): number {
    return this.maxBytes;
  }
}

function keySize(k: KeyParts): number {
  let s = k.flags.length * 2 + 256;
  for (const a of k.numbers) s += a.byteLength;
  for (const b of k.bytes) s += b.byteLength;
  return s;
}
