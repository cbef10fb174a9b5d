/**
 * A bounded cache of fits keyed by the *content* of their inputs. A hash picks the bucket; a
 * hit is confirmed by comparing every stored input bit for bit, so two inputs that collide in
 * the hash never share a fit. Least recently used entries are evicted when the entry count or
 * the total stored size passes its bound.
 */

export interface KeyParts {
  /** Numeric inputs, compared bit for bit (so −0 and 0 differ, as do NaN payloads). */
  readonly numbers: readonly Float64Array[];
  /** Byte inputs (cell kinds), compared exactly. */
  readonly bytes: readonly Uint8Array[];
  /** Scalar options (intercept, degree, orientation…). */
  readonly flags: string;
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

  /** Return the cached value for `key`, computing and storing it with `make` on a miss. */
  get(key: KeyParts, make: () => V): V {
    const h = hashKey(key);
    for (let i = 0; i < this.entries.length; i++) {
      const e = this.entries[i]!;
      if (e.hash === h && sameKey(e.key, key)) {
        this.hits++;
        // move to front (most recently used)
        this.entries.splice(i, 1);
        this.entries.unshift(e);
        return e.value;
      }
    }
    this.misses++;
    const value = make();
    // The stored inputs plus what a fit keeps (scaled design, factor, residuals): about 4× the inputs.
    const size = 4 * keySize(key);
    this.entries.unshift({ hash: h, key, size, value });
    this.total += size;
    while (this.entries.length > this.maxEntries || (this.total > this.maxBytes && this.entries.length > 1)) {
      const e = this.entries.pop()!;
      this.total -= e.size;
    }
    return value;
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

/** FNV-1a over the 32-bit words of every input, plus lengths and flags. */
export function hashKey(k: KeyParts): number {
  let h = 0x811c9dc5;
  for (const a of k.numbers) {
    h = Math.imul(h ^ a.length, 0x01000193);
    const w = new Uint32Array(a.buffer, a.byteOffset, a.length * 2);
    for (let i = 0; i < w.length; i++) h = Math.imul(h ^ w[i]!, 0x01000193);
  }
  for (const b of k.bytes) {
    h = Math.imul(h ^ b.length, 0x01000193);
    for (let i = 0; i < b.length; i++) h = Math.imul(h ^ b[i]!, 0x01000193);
  }
  for (let i = 0; i < k.flags.length; i++) h = Math.imul(h ^ k.flags.charCodeAt(i), 0x01000193);
  return h >>> 0;
}

function sameKey(a: KeyParts, b: KeyParts): boolean {
  if (a.flags !== b.flags || a.numbers.length !== b.numbers.length || a.bytes.length !== b.bytes.length) return false;
  for (let t = 0; t < a.numbers.length; t++) {
    const x = a.numbers[t]!;
    const y = b.numbers[t]!;
    if (x.length !== y.length) return false;
    const u = new Uint32Array(x.buffer, x.byteOffset, x.length * 2);
    const v = new Uint32Array(y.buffer, y.byteOffset, y.length * 2);
    for (let i = 0; i < u.length; i++) if (u[i] !== v[i]) return false;
  }
  for (let t = 0; t < a.bytes.length; t++) {
    const x = a.bytes[t]!;
    const y = b.bytes[t]!;
    if (x.length !== y.length) return false;
    for (let i = 0; i < x.length; i++) if (x[i] !== y[i]) return false;
  }
  return true;
}
