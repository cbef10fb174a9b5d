/**
 * The fast normal-equations path (src/core/normal.ts): when it is taken, and that it agrees with
 * Householder QR + augmented refinement (the path it replaces) on larger problems than the mpmath
 * fixtures (which check both paths against 60-digit arithmetic in reference.test.ts).
 */
import { describe, expect, it } from "vitest";
import { LeastSquaresFit } from "../src/core/fit";
import type { ModelSpec } from "../src/core/design";
import { normal, rng } from "./helpers/gen";

function problem(m: number, k: number, seed: number, opts: { collinear?: number; noise?: number; duplicate?: boolean } = {}): ModelSpec {
  const r = rng(seed);
  const x = new Float64Array(m * k);
  for (let j = 0; j < k; j++) for (let i = 0; i < m; i++) x[j * m + i] = normal(r) * (1 + j) + 0.5 * j;
  if (opts.collinear !== undefined) for (let i = 0; i < m; i++) x[(k - 1) * m + i] = x[i]! + opts.collinear * normal(r);
  if (opts.duplicate) for (let i = 0; i < m; i++) x[(k - 1) * m + i] = 2 * x[i]!;
  const y = new Float64Array(m);
  for (let i = 0; i < m; i++) {
    let v = (opts.noise ?? 1) * normal(r);
    for (let j = 0; j < k; j++) v += x[j * m + i]! * (j - 1.5);
    y[i] = v;
  }
  return { y, x, rows: m, cols: k, intercept: true };
}

/** The same fit on the Householder path. */
function householderFit(spec: ModelSpec): LeastSquaresFit {
  return new LeastSquaresFit(spec, { path: "householder" });
}

/** Largest difference between two fits' residuals, and the largest residual of the second. */
function residualGap(a: LeastSquaresFit, b: LeastSquaresFit): { diff: number; size: number } {
  const ra = a.fittedAndResiduals().resid;
  const rb = b.fittedAndResiduals().resid;
  let diff = 0;
  let size = 0;
  rb.forEach((v, i) => {
    diff = Math.max(diff, Math.abs(ra[i]! - v));
    size = Math.max(size, Math.abs(v));
  });
  return { diff, size };
}

describe("which path a fit takes", () => {
  it("well-conditioned full-rank data: the fast path", () => {
    expect(new LeastSquaresFit(problem(2000, 5, 1)).method).toBe("normal");
  });
  it("nearly collinear columns (condition ~1e6): Householder QR", () => {
    expect(new LeastSquaresFit(problem(2000, 5, 2, { collinear: 1e-6 })).method).toBe("householder");
  });
  it("an exactly dependent column: Householder QR, and the column is flagged", () => {
    const fit = new LeastSquaresFit(problem(500, 4, 3, { duplicate: true }));
    expect(fit.method).toBe("householder");
    expect(Array.from(fit.factor.dropped)).toEqual([4]);
  });
  it("nearly exact fits (residuals 1e-9 … 1e-15 of y): whichever path is taken, the residuals agree with Householder QR's to 1e-13 of their size", () => {
    for (const noise of [1e-9, 1e-12, 1e-15]) {
      const spec = problem(2000, 5, 4, { noise });
      const a = new LeastSquaresFit(spec);
      const { diff, size } = residualGap(a, householderFit(spec));
      expect(diff, `noise ${noise} (${a.method})`).toBeLessThanOrEqual(1e-13 * size);
    }
  });
  it("switched off: Householder QR", () => {
    expect(new LeastSquaresFit(problem(2000, 5, 1), { path: "householder" }).method).toBe("householder");
  });
});

describe("the fast path agrees with Householder QR + refinement", () => {
  const cases: [string, ModelSpec][] = [
    ["20,000 × 12", problem(20_000, 12, 5)],
    ["20,000 × 12 weighted", { ...problem(20_000, 12, 6), weights: Float64Array.from({ length: 20_000 }, (_, i) => 0.5 + (i % 7)) }],
    ["5,000 cubic", { ...problem(5000, 1, 7), degree: 3 }],
    ["3,000 × 30, no intercept", { ...problem(3000, 30, 8), intercept: false }],
  ];
  for (const [name, spec] of cases)
    it(name, () => {
      const fast = new LeastSquaresFit(spec);
      const slow = householderFit(spec);
      expect(fast.method).toBe("normal");
      expect(slow.method).toBe("householder");
      const rel = (u: number, v: number) => Math.abs(u - v) / Math.max(Math.abs(v), 1e-300);
      const bf = fast.coefficients();
      slow.coefficients().forEach((v, j) => expect(rel(bf[j]!, v), `coefficient ${j}`).toBeLessThanOrEqual(1e-14));
      const { diff, size } = residualGap(fast, slow);
      expect(diff).toBeLessThanOrEqual(1e-14 * size);
      const cf = fast.scaledCovariance();
      const cs = slow.scaledCovariance();
      const r = fast.rank;
      cs.forEach((v, t) => {
        const i = t % r;
        const j = Math.floor(t / r);
        expect(Math.abs(cf[t]! - v), `covariance (${i}, ${j})`).toBeLessThanOrEqual(1e-14 * Math.sqrt(cs[i * r + i]! * cs[j * r + j]!));
      });
      expect(rel(fast.statistics().rss as number, slow.statistics().rss as number)).toBeLessThanOrEqual(1e-14);
    });
});
