import { it } from "vitest";
import { LeastSquaresFit } from "../src/core/fit";
import { HouseholderQR } from "../src/core/qr";
import { refineAugmented } from "../src/core/refine";
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
    const q = new HouseholderQR(Float64Array.from(f.design.hi), m, k + 1);
    const t2 = performance.now();
    refineAugmented(f.qr, f.design, f.rank, 1, f.yHi, f.yLo, null); const t25 = performance.now(); f.scaledCovariance(); console.log("COV", performance.now() - t25);
    const t3 = performance.now();
    console.log(`PERF ${m} ${k} fit ${(t1 - t).toFixed(0)} qr ${(t2 - t1).toFixed(0)} refine ${(t3 - t2).toFixed(0)}`);
  }
});
