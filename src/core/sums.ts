/** Compensated sums used by several steps of the engine. */
import { SPLITTER } from "./dd";

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
  let s = 0;
  let e = 0;
  for (let j = 0; j < r; j++) {
    const zj = z[j]!;
    if (zj === 0) continue;
    for (let i = 0; i < r; i++) {
      const a = C[j * r + i]! * zj;
      // error of the first product (C·z_j) in working precision; that of (a·z_i) exactly
      const ea = fmaErr(C[j * r + i]!, zj, a);
      const zi = z[i]!;
      const p = a * zi;
      const ep = fmaErr(a, zi, p) + ea * zi;
      const sn = s + p;
      const bb = sn - s;
      e += s - (sn - bb) + (p - bb) + ep;
      s = sn;
    }
  }
  return s + e;
}

/** The rounding error of p = fl(a·b): a·b − p exactly (Dekker). */
function fmaErr(a: number, b: number, p: number): number {
  let t = SPLITTER * a;
  const ah = t - (t - a);
  const al = a - ah;
  t = SPLITTER * b;
  const bh = t - (t - b);
  const bl = b - bh;
  return ah * bh - p + ah * bl + al * bh + al * bl;
}
