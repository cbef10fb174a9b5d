/**
 * Exact scaling by powers of two. Multiplying by 2^e changes only the exponent, so it
 * is exact unless the result overflows or becomes subnormal; the engine uses it to
 * equilibrate columns and the response without perturbing the problem.
 */

const buf = new DataView(new ArrayBuffer(8));

/** 2^e built from its bit pattern (normal e) or by one exact scaling (subnormal e). */
function pow2Bits(e: number): number {
  if (e < -1022) return pow2Bits(e + 64) * 5.421010862427522e-20; // 2^-64, exact for a subnormal result
  buf.setUint32(0, (e + 1023) << 20);
  buf.setUint32(4, 0);
  return buf.getFloat64(0);
}

/** Every power of two a double holds, 2^-1074 … 2^1023, so pow2 is one lookup in hot loops. */
const POW2 = Float64Array.from({ length: 1023 + 1074 + 1 }, (_, i) => pow2Bits(i - 1074));

/** 2^e as a double, exact for every integer e in [-1074, 1023]; 0 or Infinity outside. */
export function pow2(e: number): number {
  if (e > 1023) return Infinity;
  if (e < -1074) return 0;
  return POW2[(e + 1074) | 0]!;
}

/**
 * The binary exponent of a finite nonzero v: the integer e with 2^(e-1) <= |v| < 2^e,
 * so |v| · 2^-e lies in [0.5, 1). Returns 0 for v = 0 or non-finite v.
 */
export function exponentOf(v: number): number {
  const a = Math.abs(v);
  if (a === 0 || !Number.isFinite(a)) return 0;
  let e = Math.floor(Math.log2(a)) + 1;
  // Math.log2 can be off by one near powers of two; correct it exactly.
  const f = scaleByPow2(a, -e);
  if (f >= 1) e += 1;
  else if (f < 0.5) e -= 1;
  return e;
}

/** Multiply v by 2^e without intermediate overflow or underflow when the result is representable. */
export function scaleByPow2(v: number, e: number): number {
  if (e > 1000) return v * pow2(1000) * pow2(e - 1000);
  if (e < -1000) return v * pow2(-1000) * pow2(e + 1000);
  return v * pow2(e);
}

/** a[off .. off+n) ← a · 2^e, exactly (two multiplications when |e| > 1000). */
export function scaleArrayByPow2(a: Float64Array, off: number, n: number, e: number): void {
  if (e === 0) return;
  const c = Math.max(-1000, Math.min(1000, e));
  const s1 = pow2(c);
  const s2 = pow2(e - c);
  if (s2 === 1) for (let t = off; t < off + n; t++) a[t]! *= s1;
  else for (let t = off; t < off + n; t++) a[t] = a[t]! * s1 * s2;
}
