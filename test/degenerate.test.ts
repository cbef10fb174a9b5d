/**
 * Degenerate cases have defined, documented results (README "Conventions"): no NaN, no throw,
 * "not available" with a reason where a quantity is undefined. Expected values here are exact by
 * construction (common practice: data built so the answer is known).
 */
import { describe, expect, it } from "vitest";
import { LeastSquaresFit } from "../src/core/fit";
import { findings, findingText } from "../src/findings/findings";
import type { Quantity } from "../src/core/errors";

const na = (q: Quantity): boolean => typeof q === "object";
function fit(y: number[], cols: number[][], intercept = true, weights?: number[], degree = 1) {
  const m = y.length;
  const x = new Float64Array(m * cols.length);
  cols.forEach((c, j) => c.forEach((v, i) => (x[j * m + i] = v)));
  return new LeastSquaresFit({ y: Float64Array.from(y), x, rows: m, cols: cols.length, intercept, weights: weights ? Float64Array.from(weights) : null, degree });
}
function noNaN(f: LeastSquaresFit): void {
  const s = f.statistics();
  for (const v of Object.values(s)) if (typeof v === "number") expect(Number.isNaN(v)).toBe(false);
  for (const r of f.parameterTable(0.9)) for (const v of Object.values(r)) if (typeof v === "number") expect(Number.isFinite(v)).toBe(true);
  for (const r of f.influence()) for (const v of Object.values(r)) if (typeof v === "number") expect(Number.isFinite(v)).toBe(true);
}

describe("degenerate fits", () => {
  it("zero residual degrees of freedom: σ and everything that needs it is not available", () => {
    const f = fit([1, 3, 2], [[0, 1, 2], [0, 1, 5]]);
    const s = f.statistics();
    expect(s.residualDf).toBe(0);
    expect(na(s.sigma)).toBe(true);
    expect(na(s.fStatistic)).toBe(true);
    expect(na(s.adjRSquared)).toBe(true);
    expect(na(f.parameterTable(0.95)[0]!.standardError)).toBe(true);
    expect(typeof s.rSquared).toBe("number");
    noNaN(f);
    expect(findings({ fit: f, labels: ["intercept", "a", "b"] }).map((x) => x.id)).toContain("zero-df");
  });
  it("exact fit: σ = 0, standard errors 0, t and F not available, coefficients exact", () => {
    const xs = [0, 1, 2, 3, 4, 5];
    const f = fit(xs.map((v) => 2 + 3 * v), [xs]);
    const s = f.statistics();
    expect(Array.from(f.coefficients())).toEqual([2, 3]);
    expect(s.sigma).toBe(0);
    expect(na(s.fStatistic)).toBe(true);
    expect(na(s.logLikelihood)).toBe(true);
    const t = f.parameterTable(0.95);
    expect(t[1]!.standardError).toBe(0);
    expect(na(t[1]!.t)).toBe(true);
    noNaN(f);
    expect(findings({ fit: f, labels: ["intercept", "x"] }).map((x) => x.id)).toContain("exact-fit");
  });
  it("all-zero column: non-identifiable, reported as zero", () => {
    const f = fit([1, 2, 4, 3], [[1, 2, 3, 4], [0, 0, 0, 0]]);
    expect(Array.from(f.factor.dropped)).toEqual([2]);
    expect(f.dependencies()[0]!.zero).toBe(true);
    expect(Number.isNaN(f.coefficients()[2]!)).toBe(true);
    const text = findings({ fit: f, labels: ["intercept", "speed", "spare"] }).map(findingText);
    expect(text.some((t) => t.startsWith("spare is zero in every used row"))).toBe(true);
    noNaN(f);
  });
  it("constant column alongside the intercept: flagged as duplicating the intercept", () => {
    const f = fit([1, 2, 4, 3], [[1, 2, 3, 4], [7, 7, 7, 7]]);
    expect(Array.from(f.factor.dropped)).toEqual([2]);
    const d = f.dependencies()[0]!;
    expect(d.coef[0]).toBeCloseTo(7, 14);
    const fs = findings({ fit: f, labels: ["intercept", "speed", "batch"] });
    expect(fs.map((x) => x.id)).toContain("duplicates-intercept");
    noNaN(f);
  });
  it("more columns than usable rows: later columns non-identifiable, rank = rows", () => {
    const f = fit([1, 2, 3], [[1, 0, 2], [0, 1, 1], [5, 1, 0], [2, 2, 2]], false);
    expect(f.rank).toBe(3);
    expect(Array.from(f.factor.dropped)).toEqual([3]);
    noNaN(f);
  });
  it("one row: the intercept alone is estimated, nothing needing σ", () => {
    const f = fit([5], []);
    expect(Array.from(f.coefficients())).toEqual([5]);
    expect(f.statistics().residualDf).toBe(0);
    noNaN(f);
  });
  it("no usable rows: rank 0 and every statistic not available, no exception", () => {
    const f = fit([NaN, NaN], [[1, 2]]);
    expect(f.n).toBe(0);
    expect(f.rank).toBe(0);
    const s = f.statistics();
    expect(na(s.rss)).toBe(true);
    expect(na(s.rSquared)).toBe(true);
    noNaN(f);
    expect(findings({ fit: f, labels: ["intercept", "x"] })[0]!.id).toBe("no-rows");
  });
  it("values near overflow and underflow are scaled, not overflowed", () => {
    const xs = [1e-300, 2e-300, 3e-300, 4.5e-300, 5e-300];
    const ys = [1e-10, 2.1e-10, 2.9e-10, 4.2e-10, 5.1e-10];
    const f = fit(ys, [xs]);
    const b = f.coefficients();
    const ref = fit(ys, [xs.map((v) => v * 1e300)]).coefficients()[1]! * 1e300; // same slope, ordinary scale
    expect(Math.abs(b[1]! - ref) / ref).toBeLessThan(1e-13); // slope ≈ 1e290: representable, found
    noNaN(f);
    // A slope of about 1e600 cannot be represented: the estimate is "not available", never Infinity.
    const g = fit([1e300, 2.1e300, 2.9e300, 4.2e300, 5.1e300], [xs]);
    expect(typeof g.parameterTable(0.95)[1]!.estimate).toBe("object");
    noNaN(g);
  });
  it("huge but representable slopes come out exactly scaled", () => {
    const xs = [1, 2, 3, 4.5, 5];
    const ys = [1.5, 2.1, 2.9, 4.2, 5.1];
    const a = fit(ys, [xs]);
    const b = fit(ys.map((v) => v * 2 ** 900), [xs.map((v) => v * 2 ** -100)]);
    expect(b.coefficients()[1]).toBe(a.coefficients()[1]! * 2 ** 1000);
    expect(b.coefficients()[0]).toBe(a.coefficients()[0]! * 2 ** 900);
  });
  it("zero weights remove rows from the count but keep their fitted values", () => {
    const f = fit([1, 2, 3.5, 4, 100], [[1, 2, 3, 4, 5]], true, [1, 1, 1, 1, 0]);
    expect(f.n).toBe(4);
    expect(f.statistics().zeroWeightRows).toBe(1);
    const { fitted } = f.fittedAndResiduals();
    expect(Number.isFinite(fitted[4]!)).toBe(true);
    expect(f.influence()[4]!.leverage).toBe(0);
  });
});

describe("extreme weights", () => {
  it("weights near the largest and smallest doubles give the same fit as moderate ones", () => {
    const xs = [1, 2, 3, 4.5, 5, 6];
    const ys = [1.5, 2.1, 2.9, 4.2, 5.1, 5.8];
    const w = [1, 2, 1, 3, 1, 2];
    const base = fit(ys, [xs], true, w);
    for (const s of [2 ** 1000, 2 ** -1000, 2 ** -1070]) {
      const f = fit(ys, [xs], true, w.map((v) => v * s));
      // weights scaled by a power of two (exactly): √(2^k) is exact for even k; estimates agree
      expect(Math.abs(f.coefficients()[1]! / base.coefficients()[1]! - 1)).toBeLessThan(1e-14);
      expect(typeof f.statistics().rss).toBe("number");
      noNaN(f);
    }
  });
});
