/**
 * A bounded cache of fits keyed by the *content* of their inputs. A hash picks the candidates;
 * a hit is confirmed by the caller's comparison of every input cell, bit for bit, against the
 * stored key, so two inputs that collide in the hash never share a fit. Least recently used
 * entries are evicted when the entry count or the total stored size passes its bound.
 */

export interface KeyParts {
  /** Numeric inputs, compared bit for bit (so −0 and 0 differ, as do NaN payloads). */
  readonly numbers: readonly Float64Array[];
  /** Byte inputs (cell kinds), compared exactly. */
  readonly bytes: readonly Uint8Array[];
  /** Scalar options (intercept, degree, orientation…). */
  readonly flags: string;
  /** The converted inputs themselves, for callers that compare raw input against them. */
  readonly blocks?: readonly import("./values").Block[];
}

interface Entry<V> {
  readonly hash: number;
  readonly key: KeyParts;
  readonly size: number;
  readonly value: V;
}

export class ContentCache<V> {
  private readonly entries: Entry<V>[] = [];
  private total = 0;
  hits = 0;
  misses = 0;

  constructor(
    private readonly maxEntries = 32,
    private readonly maxBytes = 256 * 1024 * 1024,
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
        this.entries.unshift(e);
        return e.value;
      }
    }
    this.misses++;
    return undefined;
  }

  /** Store a value under `hash` with its key (see find), evicting the least recently used. */
  insert(hash: number, key: KeyParts, value: V): void {
    const size = 4 * keySize(key);
    this.entries.unshift({ hash, key, size, value });
    this.total += size;
    while (this.entries.length > this.maxEntries || (this.total > this.maxBytes && this.entries.length > 1)) {
      const e = this.entries.pop()!;
      this.total -= e.size;
    }
  }

  clear(): void {
    this.entries.length = 0;
    this.total = 0;
  }

  get size(): number {
    return this.entries.length;
  }
}

function keySize(k: KeyParts): number {
  let s = k.flags.length * 2;
  for (const a of k.numbers) s += a.byteLength;
  for (const b of k.bytes) s += b.byteLength;
  return s;
}
