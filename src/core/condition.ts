/**
 * Condition number of the kept design after scaling its columns to unit length, from the
 * singular values of the small triangular factor (ml-matrix SVD of R·D⁻¹, with D the column
 * norms of R; the column norms of R equal those of the design because Q is orthogonal).
 */
import { Matrix, SingularValueDecomposition } from "ml-matrix";
import type { Factor } from "./qr";

export interface Conditioning {
  /** Condition number of the kept design with unit columns. */
  value: number;
  /** The weakest direction (right singular vector of the smallest singular value). */
  weakest: Float64Array;
  /** A lower bound on the smallest singular value of the kept design itself (σ_min(RD⁻¹)·min D). */
  sigmaMin: number;
}

export function conditionNumber(qr: Factor): Conditioning {
  const r = qr.rank;
  if (r === 0) return { value: NaN, weakest: new Float64Array(0), sigmaMin: 0 };
  let dmin = Infinity;
  const R = Matrix.zeros(r, r);
  for (let k = 0; k < r; k++) {
    let s = 0;
    for (let i = 0; i <= k; i++) s += qr.r(i, k) ** 2;
    const d = Math.sqrt(s);
    dmin = Math.min(dmin, d);
    for (let i = 0; i <= k; i++) R.set(i, k, qr.r(i, k) / d);
  }
  const svd = new SingularValueDecomposition(R, { computeLeftSingularVectors: false, computeRightSingularVectors: true, autoTranspose: false });
  const s = svd.diagonal;
  const smax = Math.max(...s);
  let smin = Infinity;
  let at = 0;
  s.forEach((v, i) => {
    if (v < smin) {
      smin = v;
      at = i;
    }
  });
  const V = svd.rightSingularVectors;
  const weakest = new Float64Array(r);
  for (let k = 0; k < r; k++) weakest[k] = V.get(k, at);
  return { value: smin > 0 ? smax / smin : Infinity, weakest, sigmaMin: smin * dmin };
}
