/** Compensated sums used by several steps of the engine. */
import { SPLITTER, twoProd, type DD } from "./dd";

/** Σ v² with compensated summation of exact squares. */
export function sumSquares(v: ArrayLike<number>, off: number, n: number): number {
  let s = 0;
  let c = 0;
  for (let i = off; i < off + n; i++) {
    const x = v[i]!;
    // TwoProduct(x, x) by Dekker's splitting, inline (x² = p + e exactly)
    const p = x * x;
    const t = SPLITTER * x;
    const xh = t - (t - x);
    const xl = x - xh;
    const e = xh * xh - p + xh * xl + xl * xh + xl * xl;
    const sn = s + p;
    const bb = sn - s;
    c += s - (sn - bb) + (p - bb) + e;
    s = sn;
  }
  return s + c;
}

/**
 * zᵀ C z for a symmetric r × r matrix C (column-major) and a vector z, accumulated in compensated
 * arithmetic (every product error-free, sums by TwoSum), so the only error left is C's own.
 */
export function quadraticForm(C: Float64Array, r: number, z: ArrayLike<number>): number {
  const tmp: DD = { hi: 0, lo: 0 };
  let s = 0;
  let e = 0;
  for (let j = 0; j < r; j++) {
    const zj = z[j]!;
    if (zj === 0) continue;
    for (let i = 0; i < r; i++) {
      // error of the first product (C·z_j) in working precision; that of (a·z_i) exactly
      twoProd(C[j * r + i]!, zj, tmp);
      const a = tmp.hi;
      const ea = tmp.lo;
      const zi = z[i]!;
      twoProd(a, zi, tmp);
      const p = tmp.hi;
      const ep = tmp.lo + ea * zi;
      const sn = s + p;
      const bb = sn - s;
      e += s - (sn - bb) + (p - bb) + ep;
      s = sn;
    }
  }
  return s + e;
}
