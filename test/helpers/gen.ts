/** Seeded generators of test matrices (column-major Float64Array). */
import { Matrix, QrDecomposition } from "ml-matrix";

/** Small deterministic PRNG (mulberry32) for building matrices from a fast-check seed. */
export function rng(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Standard normal by Box–Muller. */
export function normal(r: () => number): number {
  const u = Math.max(r(), 1e-300);
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * r());
}

/** A random m×n matrix with orthonormal columns (QR of a Gaussian matrix, via ml-matrix). */
export function orthonormal(m: number, n: number, r: () => number): Matrix {
  const g = new Matrix(m, n);
  for (let i = 0; i < m; i++) for (let j = 0; j < n; j++) g.set(i, j, normal(r));
  return new QrDecomposition(g).orthogonalMatrix.subMatrix(0, m - 1, 0, n - 1);
}

/** U·diag(s)·Vᵀ as column-major storage. */
export function withSingularValues(m: number, s: readonly number[], r: () => number): Float64Array {
  const n = s.length;
  const U = orthonormal(m, n, r);
  const V = orthonormal(n, n, r);
  const out = new Float64Array(m * n);
  for (let j = 0; j < n; j++)
    for (let i = 0; i < m; i++) {
      let v = 0;
      for (let k = 0; k < n; k++) v += U.get(i, k) * s[k]! * V.get(j, k);
      out[j * m + i] = v;
    }
  return out;
}

/** Exactly rank-r matrix B·C with small integer entries (every product and sum is exact). */
export function exactRank(m: number, n: number, rank: number, r: () => number): Float64Array {
  const B = Array.from({ length: m * rank }, () => Math.floor(r() * 17) - 8);
  const C = Array.from({ length: rank * n }, () => Math.floor(r() * 9) - 4);
  const out = new Float64Array(m * n);
  for (let j = 0; j < n; j++)
    for (let i = 0; i < m; i++) {
      let v = 0;
      for (let k = 0; k < rank; k++) v += B[k * m + i]! * C[j * rank + k]!;
      out[j * m + i] = v;
    }
  return out;
}

/** Scale each column to unit 2-norm (in place). */
export function normalizeColumns(a: Float64Array, m: number, n: number): void {
  for (let j = 0; j < n; j++) {
    let s = 0;
    for (let i = 0; i < m; i++) s += a[j * m + i]! ** 2;
    const d = Math.sqrt(s);
    if (d > 0) for (let i = 0; i < m; i++) a[j * m + i]! /= d;
  }
}

/** Singular values of a column-major m×n matrix (ml-matrix SVD). */
export function singularValues(a: Float64Array, m: number, n: number): number[] {
  const M = new Matrix(m, n);
  for (let j = 0; j < n; j++) for (let i = 0; i < m; i++) M.set(i, j, a[j * m + i]!);
  return new (require("ml-matrix").SingularValueDecomposition)(M, { computeLeftSingularVectors: false, computeRightSingularVectors: false }).diagonal as number[];
}
