/**
 * Several y columns against one x (many analytes against one set of standards): a fit of another
 * y over the same x, weights, intercept and degree reuses the first fit's design and factorization
 * (core/fit.ts `base`, functions/model.ts). Reuse must not change a single bit of any result, so
 * every check here compares a sharing fit with a fresh one exactly (Object.is on every number).
 *
 * The x columns are NIST StRD designs (Longley, Wampler4, Filip: test/fixtures/nist-strd) and a
 * seeded random one; the extra y columns are invented (the certified y plus seeded noise).
 */
import { beforeEach, describe, expect, it } from "vitest";
import { LeastSquaresFit, type FitOptions } from "../src/core/fit";
import type { ModelSpec } from "../src/core/design";
import * as L from "../src/functions/lsq";
import { cacheStats, clearCache, fitCache, getModel } from "../src/functions/model";
import { ContentCache } from "../src/functions/cache";
import { loadNist } from "./helpers/nist";

function rng(seed: number): () => number {
  let s = seed;
  return () => {
    s = (s * 16807) % 2147483647;
    return s / 2147483647 - 0.5;
  };
}

/** Every number bit for bit (Object.is), through arrays and plain objects. */
function same(a: unknown, b: unknown): boolean {
  if (typeof a === "number" && typeof b === "number") return Object.is(a, b);
  if (ArrayBuffer.isView(a) && ArrayBuffer.isView(b)) return same(Array.from(a as Float64Array), Array.from(b as Float64Array));
  if (Array.isArray(a) && Array.isArray(b)) return a.length === b.length && a.every((v, i) => same(v, b[i]));
  if (a && b && typeof a === "object" && typeof b === "object") {
    const ka = Object.keys(a);
    return ka.length === Object.keys(b).length && ka.every((k) => same((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k]));
  }
  return Object.is(a, b);
}

/** Everything a fit reports, in the order the functions ask for it. */
function everything(fit: LeastSquaresFit, newx: Float64Array, q: number): unknown[] {
  return [
    fit.coefficients(),
    fit.fittedAndResiduals(),
    fit.statistics(),
    fit.parameterTable(0.95),
    fit.covariance(),
    fit.condition(),
    fit.influence(),
    fit.dependencies(),
    fit.predict(newx, q, "prediction", 0.95),
    fit.lackOfFit(),
    fit.addedTerm(),
    fit.rank,
    fit.exact,
  ];
}

const nist = loadNist();

const designs: { name: string; spec: Omit<ModelSpec, "y">; y: Float64Array }[] = [];
for (const name of ["Longley", "Wampler4", "Filip"]) {
  const d = nist.find((s) => s.name === name)!;
  const m = d.rows.length;
  const k = d.predictors.columns ?? 1;
  const x = new Float64Array(m * k);
  for (let j = 0; j < k; j++) for (let i = 0; i < m; i++) x[j * m + i] = d.rows[i]![j + 1]!;
  designs.push({ name: `${name} (NIST StRD)`, spec: { x, rows: m, cols: k, intercept: d.intercept, degree: d.predictors.polynomialDegree ?? 1 }, y: Float64Array.from(d.rows.map((r) => r[0]!)) });
}
{
  const r = rng(11);
  const m = 300;
  const k = 6;
  const x = Float64Array.from({ length: m * k }, () => r());
  const w = Float64Array.from({ length: m }, () => 0.5 + r());
  const y = Float64Array.from({ length: m }, (_, i) => 2 + x[i]! - 3 * x[m + i]! + 0.1 * r());
  designs.push({ name: "seeded random 300 × 6, weighted", spec: { x, rows: m, cols: k, intercept: true, weights: w }, y });
}

describe("several y columns share one factorization, bit for bit", () => {
  for (const { name, spec, y } of designs) {
    for (const options of [{}, { path: "householder" }] as FitOptions[]) {
      it(`${name}, ${options.path ?? "automatic"} path: nine more y columns`, () => {
        const r = rng(7);
        const first = new LeastSquaresFit({ ...spec, y }, options);
        // two new rows: the second and third rows of x
        const k = spec.cols;
        const newx = new Float64Array(2 * k);
        for (let j = 0; j < k; j++) for (let i = 0; i < 2; i++) newx[j * 2 + i] = spec.x[j * spec.rows + 1 + i]!;
        everything(first, newx, 2); // by-products computed on the lender first
        let scale = 0;
        for (const v of y) scale = Math.max(scale, Math.abs(v));
        for (let c = 0; c < 9; c++) {
          const yc = Float64Array.from(y, (v) => v + scale * 1e-3 * (c + 1) * r());
          const shared = new LeastSquaresFit({ ...spec, y: yc }, options, first);
          const fresh = new LeastSquaresFit({ ...spec, y: yc }, options);
          expect(shared.sharesFactor).toBe(true);
          expect(fresh.sharesFactor).toBe(false);
          expect(same(everything(shared, newx, 2), everything(fresh, newx, 2))).toBe(true);
        }
      });
    }
  }

  it("a y the fast path refuses (all zero) does not make another y take the slower path (found by the fuzz test)", () => {
    // 6 × 3 design with a subnormal entry (fuzz counterexample, seed 20261201)
    const x = Float64Array.from([0, 0, -1, 0, 0, 0, 0, 0, 0, 0, -5e-324, 0, 0, 0, 0, 0, 0, -1]);
    const spec = { x, rows: 6, cols: 3, intercept: true };
    const zero = new LeastSquaresFit({ ...spec, y: new Float64Array(6) });
    const y = Float64Array.from([1, 0, 0, 0, 0, 0]);
    const shared = new LeastSquaresFit({ ...spec, y }, {}, zero);
    const fresh = new LeastSquaresFit({ ...spec, y });
    expect(shared.method).toBe(fresh.method);
    const newx = new Float64Array(3);
    expect(same(everything(shared, newx, 1), everything(fresh, newx, 1))).toBe(true);
  });

  it("a y with a missing cell uses other rows: no reuse, and the same results as a fresh fit", () => {
    const { spec, y } = designs[0]!;
    const first = new LeastSquaresFit({ ...spec, y });
    const yc = Float64Array.from(y);
    yc[3] = NaN;
    const shared = new LeastSquaresFit({ ...spec, y: yc }, {}, first);
    const fresh = new LeastSquaresFit({ ...spec, y: yc });
    expect(shared.sharesFactor).toBe(false);
    expect(fresh.n).toBe(first.n - 1);
    const newx = spec.x.filter((_: number, i: number) => i % spec.rows === 0);
    expect(same(everything(shared, newx, 1), everything(fresh, newx, 1))).toBe(true);
  });
});

describe("through the functions: ten analyte columns against one set of standards", () => {
  beforeEach(() => clearCache());
  // invented: ten analytes read on one instrument against the same seven standards
  const conc = [[0], [0.5], [1], [2], [4], [8], [10]];
  const analytes = Array.from({ length: 10 }, (_, a) => conc.map(([c], i) => [0.002 * a + (0.11 + 0.01 * a) * c! + 0.001 * (((i * 7 + a * 3) % 5) - 2)]));

  it("each column's COEF, PARAMS and CHECK equal those of a runtime that saw only that column", () => {
    const shared = analytes.map((y) => [L.coef({ y, x: conc }), L.params({ y, x: conc }), L.check({ y, x: conc })]);
    expect(cacheStats().misses).toBe(10);
    for (let a = 1; a < 10; a++) expect((getModel({ y: analytes[a], x: conc }) as unknown as { fit: LeastSquaresFit }).fit.sharesFactor).toBe(true);
    const fresh = analytes.map((y) => {
      clearCache();
      return [L.coef({ y, x: conc }), L.params({ y, x: conc }), L.check({ y, x: conc })];
    });
    expect(same(shared, fresh)).toBe(true);
  });

  it("different x values, weights or options do not share", () => {
    const x2 = conc.map(([c]) => [c! * 1.0000001]);
    L.coef({ y: analytes[0], x: conc });
    const other = [getModel({ y: analytes[1], x: x2 }), getModel({ y: analytes[1], x: conc, intercept: false }), getModel({ y: analytes[1], x: conc, weights: conc.map(([c]) => [1 + c!]) })];
    for (const m of other) expect((m as unknown as { fit: LeastSquaresFit }).fit.sharesFactor).toBe(false);
  });
});

describe("the cache counts a borrowed array once and never loses it", () => {
  it("a borrower is evicted with its lender; a hit on a borrower keeps its lender", () => {
    const c = new ContentCache<string>(11_000, () => 0);
    const x = new Float64Array(500); // 4,000 bytes, counted by the lender only
    const lender = { numbers: [new Float64Array(1), x], bytes: [], flags: "a" };
    c.insert(1, lender, "lender");
    c.insert(2, { numbers: [new Float64Array(1)], bytes: [], flags: "b", lender }, "borrower");
    c.insert(3, { numbers: [new Float64Array(100)], bytes: [], flags: "c" }, "other");
    expect(c.size).toBe(3);
    // a hit on the borrower moves its lender ahead of "other"
    expect(c.find(2, () => true)).toBe("borrower");
    c.insert(4, { numbers: [new Float64Array(700)], bytes: [], flags: "d" }, "big"); // evicts "other" only
    expect(c.size).toBe(3);
    expect(c.scan((k) => k.flags === "c")).toBeUndefined();
    // now the lender is least recent: evicting it takes the borrower along
    c.insert(5, { numbers: [new Float64Array(800)], bytes: [], flags: "e" }, "bigger");
    expect(c.scan((k) => k.flags === "a")).toBeUndefined();
    expect(c.scan((k) => k.flags === "b")).toBeUndefined();
  });
  it("a borrower in use outlives its lender and then carries the borrowed bytes", () => {
    const c = new ContentCache<string>(5_000, () => 0);
    const lender = { numbers: [new Float64Array(550)], bytes: [], flags: "a" };
    c.insert(1, lender, "lender");
    c.insert(2, { numbers: [], bytes: [], flags: "b", lender }, "borrower");
    c.setBudget(1_000); // only the entry in use stays
    expect(c.size).toBe(1);
    expect(c.scan((k) => k.flags === "b")).toBeDefined();
    expect(c.bytes).toBeGreaterThan(4_400);
  });
  it("the fit cache of the functions stays within its budget with ten borrowers", () => {
    clearCache();
    const conc = Array.from({ length: 2000 }, (_, i) => [i, Math.sin(i)]);
    for (let a = 0; a < 10; a++) L.coef({ y: conc.map(([c, s]) => [a + c! * 0.5 + s!]), x: conc });
    expect(fitCache().bytes).toBeLessThanOrEqual(fitCache().budget);
    expect(fitCache().size).toBe(10);
  });
});
