import { it } from "vitest";
import { LeastSquaresFit } from "../src/core/fit";
import { rng, normal } from "./helpers/gen";
it("perf", () => {
  for (const [m, k] of [[100000, 20], [1000000, 10]] as const) {
    const r = rng(1);
    const x = new Float64Array(m * k);
    for (let i = 0; i < x.length; i++) x[i] = normal(r);
    const y = new Float64Array(m);
    for (let i = 0; i < m; i++) y[i] = normal(r) + x[i]!;
    let t = performance.now();
    const f = new LeastSquaresFit({ y, x, rows: m, cols: k, intercept: true });
    const t1 = performance.now();
    f.coefficients(); f.fittedAndResiduals();
    const t2 = performance.now();
    f.scaledCovariance();
    const t3 = performance.now();
    console.log(`PERF ${m} ${k} fit ${(t1 - t).toFixed(0)} fitted ${(t2 - t1).toFixed(0)} cov ${(t3 - t2).toFixed(0)} steps ${f.refineSteps}`);
  }
});
