/**
 * Double-double ("dd") arithmetic: a value is the unevaluated sum hi + lo of two doubles
 * with |lo| <= ulp(hi)/2, giving about 106 bits of significand.
 *
 * JavaScript has no fused multiply-add, so the exact product uses Dekker's splitting: a
 * double is split into two 26-bit halves whose pairwise products are exact. The splitting
 * constant 2^27 + 1 overflows for |a| > 2^996; the engine only splits values that it has
 * scaled by powers of two to magnitude <= 2^10 or so, far from that limit.
 *
 * These helpers return results through a small scratch object to avoid allocation in loops.
 * The hot kernels inline the same formulas.
 */

/** Splitting constant for Dekker's algorithm: 2^27 + 1. */
export const SPLITTER = 134217729;

/** Scratch result of an error-free transformation: value = hi + lo exactly. */
export interface DD {
  hi: number;
  lo: number;
}

/** Error-free sum (Knuth's TwoSum): a + b = out.hi + out.lo exactly. */
export function twoSum(a: number, b: number, out: DD): DD {
  const s = a + b;
  const bb = s - a;
  out.hi = s;
  out.lo = a - (s - bb) + (b - bb);
  return out;
}

/** Error-free product (Dekker's TwoProduct): a · b = out.hi + out.lo exactly (no overflow assumed). */
export function twoProd(a: number, b: number, out: DD): DD {
  const p = a * b;
  let t = SPLITTER * a;
  const ah = t - (t - a);
  const al = a - ah;
  t = SPLITTER * b;
  const bh = t - (t - b);
  const bl = b - bh;
  out.hi = p;
  out.lo = ah * bh - p + ah * bl + al * bh + al * bl;
  return out;
}

/** dd product (ahi + alo) · (bhi + blo), rounded to a dd (relative error about 2^-104). */
export function ddMul(ahi: number, alo: number, bhi: number, blo: number, out: DD): DD {
  twoProd(ahi, bhi, out);
  const lo = out.lo + (ahi * blo + alo * bhi);
  const s = out.hi + lo;
  out.lo = lo - (s - out.hi);
  out.hi = s;
  return out;
}

/** Square root of a nonnegative double as a dd: sqrt(a) = out.hi + out.lo to about 2^-104 relative. */
export function ddSqrt(a: number, out: DD): DD {
  if (a === 0) {
    out.hi = 0;
    out.lo = 0;
    return out;
  }
  const s = Math.sqrt(a);
  twoProd(s, s, out);
  // a - s² exactly-ish: (a - hi) is exact by Sterbenz when s² is close to a.
  const r = a - out.hi - out.lo;
  out.hi = s;
  out.lo = r / (2 * s);
  return out;
}
