/**
 * The rank decision (src/core/qr.ts), checked from both sides as good numerical libraries do:
 * never more than the true rank on matrices of known rank, and still full rank when the smallest
 * singular value (unit-norm columns) is 100× the threshold. fast-check drives the sizes and seeds.
 */
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { HouseholderQR } from "../src/core/qr";
import { defaultTolerance } from "../src/core/tolerances";
import { LsqError } from "../src/core/errors";
import { exactRank, normalizeColumns, rng, singularValues, withSingularValues } from "./helpers/gen";

const runs = { numRuns: 300, seed: 4242 };

describe("rank is never overestimated", () => {
  it("on exactly rank-r integer products B·C", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 60 }), fc.integer({ min: 1, max: 8 }), fc.integer({ min: 0, max: 8 }), fc.integer(), (m, n, r0, seed) => {
        const r = Math.min(r0, n, m);
        const a = exactRank(m, n, r, rng(seed));
        const qr = new HouseholderQR(a, m, n);
        expect(qr.rank).toBeLessThanOrEqual(r);
      }),
      runs,
    );
  });
  it("on U·Σ·Vᵀ with trailing singular values exactly zero (rounded products)", () => {
    fc.assert(
      fc.property(fc.integer({ min: 2, max: 60 }), fc.integer({ min: 2, max: 8 }), fc.integer({ min: 1, max: 7 }), fc.integer(), (m0, n, r0, seed) => {
        const m = Math.max(m0, n);
        const r = Math.min(r0, n - 1);
        const s = Array.from({ length: n }, (_, k) => (k < r ? 10 ** (-k / 2) : 0));
        const a = withSingularValues(m, s, rng(seed));
        const qr = new HouseholderQR(a, m, n);
        expect(qr.rank).toBeLessThanOrEqual(r);
      }),
      runs,
    );
  });
});

describe("full rank is kept when the smallest singular value is 100× the threshold", () => {
  it("unit-norm columns with σ_min ≥ 100·tol", () => {
    fc.assert(
      fc.property(fc.integer({ min: 2, max: 60 }), fc.integer({ min: 1, max: 8 }), fc.integer(), (m0, n, seed) => {
        const m = Math.max(m0, n);
        const tol = defaultTolerance(m, n);
        const s = Array.from({ length: n }, (_, k) => (k === n - 1 ? 150 * tol : 1 / (k + 1)));
        const a = withSingularValues(m, s, rng(seed));
        normalizeColumns(a, m, n);
        const smin = Math.min(...singularValues(a, m, n));
        fc.pre(smin >= 100 * tol);
        const qr = new HouseholderQR(Float64Array.from(a), m, n);
        expect(qr.rank, `σ_min = ${smin}, tol = ${tol}`).toBe(n);
      }),
      runs,
    );
  });
});

describe("tolerance semantics (documented in qr.ts)", () => {
  const m = 6;
  const a = () => Float64Array.from([1, 2, 3, 4, 5, 6, 2, 4, 6, 8, 10, 12.000000001, 1, 0, 1, 0, 1, 0]);
  it("default (undefined or NaN) flags a column within the threshold and keeps the rest", () => {
    const q1 = new HouseholderQR(a(), m, 3);
    const q2 = new HouseholderQR(a(), m, 3, NaN);
    expect(q1.rank).toBe(3); // 1e-9 relative remainder is far above the default ~1e-14
    expect(q2.rank).toBe(3);
    expect(q1.tolerance).toBe(defaultTolerance(m, 3));
  });
  it("a larger tolerance flags the nearly dependent later column, never the earlier one", () => {
    const q = new HouseholderQR(a(), m, 3, 1e-6);
    expect(Array.from(q.kept)).toEqual([0, 2]);
    expect(Array.from(q.dropped)).toEqual([1]);
  });
  it("0 flags only exact zero remainders", () => {
    const z = Float64Array.from([1, 2, 3, 0, 0, 0, 2, 4, 6]);
    const q = new HouseholderQR(z, 3, 3, 0);
    expect(Array.from(q.dropped)).toContain(1);
    expect(q.rank).toBeLessThanOrEqual(2);
  });
  it("negative is rejected", () => {
    expect(() => new HouseholderQR(a(), m, 3, -1)).toThrow(LsqError);
  });
  it("≥ 1 (and +Infinity) flags every column", () => {
    expect(new HouseholderQR(a(), m, 3, 1).rank).toBe(0);
    expect(new HouseholderQR(a(), m, 3, Infinity).rank).toBe(0);
  });
  it("an all-zero matrix has rank 0", () => {
    expect(new HouseholderQR(new Float64Array(12), 4, 3).rank).toBe(0);
  });
});
