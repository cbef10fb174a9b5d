/**
 * One answer per question inside the engine (each check failed before the engine had one
 * decision for it):
 * - the exact-fit decision: STATS and CHECK agree on decimal data that lie on a line;
 * - predictions use the rank decision's tolerance, so a fit made with a looser tolerance predicts
 *   at its own rows;
 * - predictions, their standard errors and limits come from the refined covariance (12 digits on
 *   the nearly collinear mpmath fixture, κ up to 1e11);
 * - influence measures to 13 digits on Longley (κ ≈ 4e4) against the exact rational hat matrix
 *   (scripts/gen-calibration.py, Python fractions).
 */
import { readFileSync } from "node:fs";
import { resolve } from "node:path";
import { describe, expect, it } from "vitest";
import { LeastSquaresFit } from "../src/core/fit";
import { findings } from "../src/findings/findings";
import { fitNist } from "./helpers/nistfit";
import { loadNist } from "./helpers/nist";
import { loadReference } from "./helpers/reference";

const rel = (got: number, want: number): number => (want === 0 ? Math.abs(got) : Math.abs(got - want) / Math.abs(want));

describe("one exact-fit decision", () => {
  it("y = 0.1 + 0.3·x on decimal x = 0.7 … 1.6: STATS has no F (exact) and CHECK says exact", () => {
    const xs = [0.7, 0.8, 0.9, 1.0, 1.1, 1.2, 1.3, 1.4, 1.5, 1.6];
    const ys = xs.map((v) => 0.1 + 0.3 * v);
    const fit = new LeastSquaresFit({ y: Float64Array.from(ys), x: Float64Array.from(xs), rows: 10, cols: 1, intercept: true });
    expect(fit.exact).toBe(true);
    const st = fit.statistics();
    expect(typeof st.fStatistic).toBe("object");
    expect(typeof st.fPValue).toBe("object");
    expect(st.sigma).toBe(0);
    expect(findings({ fit, labels: ["intercept", "x"] }).map((f) => f.id)).toContain("exact-fit");
    // every residual is reported as zero, the same decision
    expect(Array.from(fit.fittedAndResiduals().resid).every((r) => r === 0)).toBe(true);
  });
  it("data with real scatter is not called exact", () => {
    const xs = [0.7, 0.8, 0.9, 1.0, 1.1, 1.2];
    const ys = xs.map((v, i) => 0.1 + 0.3 * v + (i % 2 ? 1e-9 : -1e-9));
    const fit = new LeastSquaresFit({ y: Float64Array.from(ys), x: Float64Array.from(xs), rows: 6, cols: 1, intercept: true });
    expect(fit.exact).toBe(false);
    expect(typeof fit.statistics().fStatistic).toBe("number");
  });
});

describe("predictions use the rank decision's tolerance", () => {
  it("with a tolerance of 1e-5, a column within 1e-7 of a combination is dropped and the fit still predicts at its own rows", () => {
    const m = 12;
    const a = Array.from({ length: m }, (_, i) => 1 + i);
    const b = Array.from({ length: m }, (_, i) => Math.sin(i) * 3);
    const c = a.map((v, i) => 2 * v - b[i]! + 1e-7 * Math.cos(7 * i)); // a combination, up to 1e-7
    const y = a.map((v, i) => 0.5 + v - 0.3 * b[i]! + 0.01 * Math.sin(3 * i));
    const x = Float64Array.from([...a, ...b, ...c]);
    const fit = new LeastSquaresFit({ y: Float64Array.from(y), x, rows: m, cols: 3, intercept: true, tolerance: 1e-5 });
    expect(Array.from(fit.factor.dropped)).toEqual([3]);
    const preds = fit.predict(x, m);
    for (const p of preds) expect(typeof p.value, JSON.stringify(p.value)).toBe("number");
    // a row far off the relation still cannot be predicted
    const off = Float64Array.from([1, 2, 100]);
    expect(typeof fit.predict(off, 1)[0]!.value).toBe("object");
  });
});

const refs = loadReference();

describe(`predictions from the refined covariance (${refs.generator}, mpmath)`, () => {
  it("the standard errors of the mean response and of a new observation, and the limits, to 12 digits on every fixture", () => {
    let worst = 0;
    let where = "";
    for (const pr of refs.problems) {
      if (!pr.prediction) continue;
      const m = pr.rows;
      const k = pr.cols;
      const x = new Float64Array(m * k);
      for (let j = 0; j < k; j++) for (let i = 0; i < m; i++) x[j * m + i] = pr.x[i]![j] ?? NaN;
      for (const path of ["auto", "householder"] as const) {
        const fit = new LeastSquaresFit({ y: Float64Array.from(pr.y, (v) => v ?? NaN), x, rows: m, cols: k, intercept: pr.intercept, weights: pr.weights ? Float64Array.from(pr.weights) : null, degree: pr.degree }, { path });
        const [p] = fit.predict(Float64Array.from(pr.prediction.x), 1, "confidence", 0.95);
        const e1 = rel(p!.seMean as number, pr.prediction.seMean);
        const e2 = rel(p!.seNew as number, pr.prediction.seNew);
        const q = fit.critical(0.95) as number;
        const e3 = Math.max(rel(p!.upper as number, pr.prediction.value + q * pr.prediction.seMean), rel(p!.lower as number, pr.prediction.value - q * pr.prediction.seMean));
        for (const [e, what] of [[e1, "seMean"], [e2, "seNew"], [e3, "limits"]] as [number, string][])
          if (e > worst) {
            worst = e;
            where = `${pr.name} (${pr.kind}, ${path}) ${what}`;
          }
      }
    }
    console.log(`predictions: worst relative error ${worst.toExponential(2)} at ${where}`);
    expect(worst, where).toBeLessThan(1e-12);
  });
});

describe("influence measures against the exact rational hat matrix (Longley, κ ≈ 4e4)", () => {
  const ref = JSON.parse(readFileSync(resolve(__dirname, "fixtures/calibration.json"), "utf8")) as { influence: { dataset: string; rows: { leverage: number; standardized: number; studentized: number; cooks: number }[] } };
  it("leverage, standardized and studentized residuals and Cook's distance to 13 digits", () => {
    const d = loadNist().find((s) => s.name === ref.influence.dataset)!;
    for (const path of ["auto", "householder"] as const) {
      const fit = fitNist(d, { path });
      const inf = fit.influence();
      const digits = (a: number, b: number): number => -Math.log10(Math.max(rel(a, b), 1e-17));
      let worst = 99;
      ref.influence.rows.forEach((r, i) => {
        for (const key of ["leverage", "standardized", "studentized", "cooks"] as const) worst = Math.min(worst, digits(inf[i]![key] as number, r[key]));
      });
      console.log(`Longley influence (${fit.method}): ${worst.toFixed(1)} digits at worst`);
      expect(worst).toBeGreaterThanOrEqual(13);
    }
  });
});
