/**
 * Property tests (fast-check, fixed seed) of the factorization and the fit:
 * - reconstruction X̃(:, kept) = Q·R;
 * - the residual is orthogonal to the kept columns in the backward-error sense used by LAPACK's
 *   least-squares tests: ‖X̃ᵀ r̃‖ / (‖X̃‖·‖r̃‖·ε·max(m, n)) ≤ 10 (scaled design, Frobenius norms);
 * - multiplying y by 2^k and a column by 2^j (|k|, |j| ≤ 400) changes the results exactly by that
 *   scaling (powers of two are exact), with no overflow or underflow.
 */
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { LeastSquaresFit } from "../src/core/fit";
import { normal, rng } from "./helpers/gen";

const EPS = 2.220446049250313e-16;
const runs = { numRuns: 200, seed: 777 };

function problem(m: number, k: number, seed: number, spread: number) {
  const r = rng(seed);
  const x = new Float64Array(m * k);
  for (let j = 0; j < k; j++) {
    const s = 2 ** Math.round((r() - 0.5) * spread);
    for (let i = 0; i < m; i++) x[j * m + i] = normal(r) * s;
  }
  const y = new Float64Array(m);
  for (let i = 0; i < m; i++) {
    let v = normal(r);
    for (let j = 0; j < k; j++) v += x[j * m + i]! * (j + 1);
    y[i] = v;
  }
  return { x, y };
}

const sizes = fc.tuple(fc.integer({ min: 1, max: 60 }), fc.integer({ min: 0, max: 8 }), fc.integer(), fc.integer({ min: 0, max: 60 }), fc.boolean());

describe("factorization identities", () => {
  it("reconstruction: X̃(:, kept) ≈ Q·R to a few ε relative (Householder path)", () => {
    fc.assert(
      fc.property(sizes, ([m, k, seed, spread, intercept]) => {
        const { x, y } = problem(m, k, seed, spread);
        const fit = new LeastSquaresFit({ y, x, rows: m, cols: k, intercept }, { path: "householder" });
        const qr = fit.householder!;
        const n = fit.n;
        const r = qr.rank;
        const Q = qr.thinQ(r);
        let err = 0;
        let norm = 0;
        for (let c = 0; c < r; c++) {
          const col = fit.designColumn(qr.kept[c]!);
          for (let i = 0; i < n; i++) {
            let v = 0;
            for (let t = 0; t <= c; t++) v += Q[t * n + i]! * qr.r(t, c);
            err += (v - col[i]!) ** 2;
            norm += col[i]! ** 2;
          }
        }
        expect(Math.sqrt(err)).toBeLessThanOrEqual(10 * Math.max(n, 1) * EPS * Math.sqrt(norm) + 1e-300);
      }),
      runs,
    );
  });

  it("backward error of the residual ‖X̃ᵀr̃‖ / (‖X̃‖‖r̃‖ ε max(m,n)) ≤ 10 on full-rank problems", () => {
    fc.assert(
      fc.property(sizes, ([m, k, seed, spread, intercept]) => {
        const { x, y } = problem(m, k, seed, spread);
        const fit = new LeastSquaresFit({ y, x, rows: m, cols: k, intercept });
        fc.pre(fit.factor.dropped.length === 0 && fit.rank > 0 && fit.n > fit.rank);
        const n = fit.n;
        const r = fit.residScaled;
        let rn = 0;
        for (let i = 0; i < n; i++) rn += r[i]! ** 2;
        rn = Math.sqrt(rn);
        fc.pre(rn > 0);
        let xn = 0;
        let g = 0;
        for (const c of fit.factor.kept) {
          let d = 0;
          const col = fit.designColumn(c);
          for (let i = 0; i < n; i++) {
            d += col[i]! * r[i]!;
            xn += col[i]! ** 2;
          }
          g += d * d;
        }
        const ratio = Math.sqrt(g) / (Math.sqrt(xn) * rn * EPS * Math.max(n, fit.rank));
        expect(ratio).toBeLessThanOrEqual(10);
      }),
      runs,
    );
  });
});

describe("exact scaling by powers of two", () => {
  it("y·2^a and column c·2^b scale coefficients, standard errors and σ exactly; R² and F are unchanged", () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 3, max: 40 }),
        fc.integer({ min: 1, max: 5 }),
        fc.integer(),
        fc.integer({ min: -400, max: 400 }),
        fc.integer({ min: -400, max: 400 }),
        fc.nat(),
        (m, k, seed, a, b, c0) => {
          const { x, y } = problem(m, k, seed, 20);
          const c = c0 % k;
          const base = new LeastSquaresFit({ y, x, rows: m, cols: k, intercept: true });
          fc.pre(base.n > base.rank + 1);
          const y2 = y.map((v) => v * 2 ** a);
          const x2 = Float64Array.from(x);
          for (let i = 0; i < m; i++) x2[c * m + i] = x2[c * m + i]! * 2 ** b;
          const fit = new LeastSquaresFit({ y: y2, x: x2, rows: m, cols: k, intercept: true });
          const b0 = base.coefficients();
          const b1 = fit.coefficients();
          const t0 = base.parameterTable(0.95);
          const t1 = fit.parameterTable(0.95);
          for (let j = 0; j <= k; j++) {
            const f = j === c + 1 ? 2 ** (a - b) : 2 ** a;
            expect(b1[j]).toBe(b0[j]! * f);
            expect(t1[j]!.standardError).toBe((t0[j]!.standardError as number) * f);
            expect(t1[j]!.t).toBe(t0[j]!.t);
          }
          const s0 = base.statistics();
          const s1 = fit.statistics();
          expect(s1.sigma).toBe((s0.sigma as number) * 2 ** a);
          expect(s1.rSquared).toBe(s0.rSquared);
          expect(s1.fStatistic).toBe(s0.fStatistic);
        },
      ),
      runs,
    );
  });
});

describe("design storage", () => {
  it("column views into x (all rows used) and a materialized design (a row skipped) give bit-identical fits", () => {
    fc.assert(
      fc.property(fc.integer({ min: 3, max: 50 }), fc.integer({ min: 1, max: 6 }), fc.integer(), fc.integer({ min: 0, max: 60 }), fc.boolean(), (m, k, seed, spread, intercept) => {
        const { x, y } = problem(m, k, seed, spread);
        const a = new LeastSquaresFit({ y, x, rows: m, cols: k, intercept });
        // the same data with one extra row whose y is missing: that fit must materialize its design
        const x2 = new Float64Array((m + 1) * k);
        for (let j = 0; j < k; j++) {
          x2.set(x.subarray(j * m, (j + 1) * m), j * (m + 1));
          x2[j * (m + 1) + m] = 0.5;
        }
        const y2 = new Float64Array(m + 1);
        y2.set(y);
        y2[m] = NaN;
        const b = new LeastSquaresFit({ y: y2, x: x2, rows: m + 1, cols: k, intercept });
        expect(a.design.cols).toBeDefined();
        expect(b.design.cols).toBeUndefined();
        expect(Array.from(b.coefficients())).toEqual(Array.from(a.coefficients()));
        expect({ ...b.statistics(), observationsSkipped: 0 }).toEqual(a.statistics());
        expect(Array.from(b.scaledCovariance())).toEqual(Array.from(a.scaledCovariance()));
      }),
      { numRuns: 100, seed: 31 },
    );
  });
});
