/**
 * Cross-checks against independent reference libraries: fixtures in test/fixtures/reference.json
 * were produced by the committed, seeded generator scripts/gen-reference.py with Debian's
 * python3-mpmath (60-digit arithmetic) and python3-numpy; versions are recorded in the file and
 * printed below. Problems: weights (some zero), rank-deficient, nearly collinear (scaled
 * condition up to 1e11), skipped rows, no intercept, weighted polynomials (degree 2–6).
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { LeastSquaresFit, type FitOptions } from "../src/core/fit";
import { fUpper, tQuantile, tTwoSided } from "../src/core/distributions";
import { loadReference, type Problem } from "./helpers/reference";

const ref = loadReference();

const SOURCE = `${ref.generator} (seed ${ref.seed}; mpmath ${ref.mpmath}, numpy ${ref.numpy})`;

function fitOf(pr: Problem, options: FitOptions = {}): LeastSquaresFit {
  const m = pr.rows;
  const k = pr.cols;
  const x = new Float64Array(m * k);
  for (let j = 0; j < k; j++) for (let i = 0; i < m; i++) x[j * m + i] = pr.x[i]![j] ?? NaN;
  const y = Float64Array.from(pr.y, (v) => v ?? NaN);
  return new LeastSquaresFit({ y, x, rows: m, cols: k, intercept: pr.intercept, weights: pr.weights ? Float64Array.from(pr.weights) : null, degree: pr.degree }, options);
}

function relErr(got: number, want: number): number {
  if (want === 0) return Math.abs(got);
  return Math.abs(got - want) / Math.abs(want);
}

describe(`reference fits from ${SOURCE}`, () => {
  it("prints the source", () => {
    console.log(`reference fixtures: ${SOURCE}, ${ref.problems.length} problems`);
    expect(ref.problems.length).toBeGreaterThanOrEqual(40);
  });
  // Every problem with the fast normal-equations path allowed (taken where its accuracy check
  // passes; src/core/normal.ts) and with Householder QR only.
  // And once more with the WebAssembly kernels switched off (their JavaScript twins).
  describe.each([
    { fast: true, kernels: true },
    { fast: false, kernels: true },
    { fast: true, kernels: false },
  ])("fast path allowed: $fast, WebAssembly kernels: $kernels", ({ fast, kernels }) => {
    const options: FitOptions = { path: fast ? "auto" : "householder", kernels: kernels ? "always" : false };
    for (const pr of ref.problems) {
      it(`${pr.name}: rank, coefficients, standard errors, σ, R², fitted values, residuals, leverage`, () => {
        const fit = fitOf(pr, options);
        expect(fit.rank, "rank").toBe(pr.rank);
        expect(Array.from(fit.factor.dropped), "non-identifiable columns").toEqual(pr.nonIdentifiable);
        const b = fit.coefficients();
        const table = fit.parameterTable(0.95);
        const st = fit.statistics();
        const worst: Record<string, number> = { coef: 0, se: 0, p: 0, sigma: 0, r2: 0, fitted: 0, resid: 0, lev: 0 };
        pr.coefficients.forEach((c, j) => {
          if (c === null) expect(Number.isNaN(b[j]!)).toBe(true);
          else worst.coef = Math.max(worst.coef!, relErr(b[j]!, c));
        });
        pr.standardErrors.forEach((s, j) => {
          if (s !== null) worst.se = Math.max(worst.se!, relErr(table[j]!.standardError as number, s));
        });
        pr.pValues.forEach((p, j) => {
          if (p !== null) worst.p = Math.max(worst.p!, relErr(table[j]!.p as number, p));
        });
        if (pr.sigma !== null) worst.sigma = relErr(st.sigma as number, pr.sigma);
        worst.r2 = relErr(st.rSquared as number, pr.rSquared);
        const { fitted, resid } = fit.fittedAndResiduals();
        const ymax = Math.max(...pr.y.map((v) => Math.abs(v ?? 0)));
        const rmax = Math.max(...pr.residuals.map((v) => Math.abs(v ?? 0)));
        pr.fitted.forEach((f, i) => {
          if (f === null) expect(Number.isNaN(fitted[i]!)).toBe(true);
          else worst.fitted = Math.max(worst.fitted!, Math.abs(fitted[i]! - f) / ymax);
        });
        pr.residuals.forEach((r, i) => {
          // Used rows: the refined residual, accurate relative to the residuals' own size. Zero-weight
          // rows are y − x·b, accurate relative to y.
          if (r !== null) worst.resid = Math.max(worst.resid!, Math.abs(resid[i]! - r) / (rmax + 10 * ymax * (pr.weights?.[i] === 0 ? 1 : 0)));
        });
        const lev = fit.leverageUsed();
        fit.used.forEach((i, t) => {
          worst.lev = Math.max(worst.lev!, Math.abs(lev[t]! - pr.leverage[i]!));
        });
        // Leverage: corrected for the factor's rounding on the Householder path (a few ε), from R on
        // the fast path (κ below about 50): the tolerance c·κ·ε covers both, with c = 10.
        const kappa = typeof st.conditionNumber === "number" ? st.conditionNumber : 1;
        const tol: Record<string, number> = { coef: 1e-13, se: 1e-13, p: 1e-11, sigma: 1e-13, r2: 1e-13, fitted: 1e-14, resid: 1e-13, lev: 1e-14 + 10 * kappa * 2.22e-16 };
        for (const key of Object.keys(tol)) expect(worst[key], `${pr.name} ${key}: worst relative error ${worst[key]} > ${tol[key]} (${SOURCE})`).toBeLessThanOrEqual(tol[key]!);
      });
      it(`${pr.name}: prediction with standard errors, studentized residuals and Cook's distance`, () => {
        const fit = fitOf(pr, options);
        const st = fit.statistics();
        const kappa = typeof st.conditionNumber === "number" ? st.conditionNumber : 1;
        if (pr.prediction) {
          const [pv] = fit.predict(Float64Array.from(pr.prediction.x), 1);
          const scale = Math.max(...pr.y.map((v) => Math.abs(v ?? 0)));
          // predictions use the coefficients' low parts and the corrected hat value (fit.ts), so
          // they and their standard errors keep 12 digits whatever the conditioning
          expect(relErr(pv!.value as number, pr.prediction.value), `${pr.name} prediction (${SOURCE})`).toBeLessThan(1e-12);
          expect(relErr(pv!.seMean as number, pr.prediction.seMean), `${pr.name} se of the mean (${SOURCE})`).toBeLessThan(1e-12);
          expect(relErr(pv!.seNew as number, pr.prediction.seNew), `${pr.name} se of a new observation (${SOURCE})`).toBeLessThan(1e-12);
          void scale;
        }
        if (pr.nonIdentifiable.length > 0 && pr.prediction) {
          // a new row that breaks the dependency between columns cannot be predicted
          const broken = Float64Array.from(pr.prediction.x, (v, j) => (j === pr.cols - 1 ? v + 1 : v));
          expect(typeof fit.predict(broken, 1)[0]!.value).toBe("object");
        }
        // influence measures inherit the leverage's accuracy (about κ·ε, divided by 1 − h)
        const inf = fit.influence();
        pr.studentized.forEach((s, i) => {
          if (s === null) return;
          const h = pr.leverage[i]!;
          const tol = (1e-12 + 100 * kappa * 2.22e-16) / (1 - h);
          expect(relErr(inf[i]!.studentized as number, s), `${pr.name} studentized row ${i + 1} (${SOURCE})`).toBeLessThan(tol);
          expect(relErr(inf[i]!.cooks as number, pr.cooks[i]!), `${pr.name} Cook's distance row ${i + 1} (${SOURCE})`).toBeLessThan(tol);
        });
      });
    }
    it("both paths are exercised", () => {
      const counts: Record<string, number> = {};
      for (const pr of ref.problems) {
        const m = fitOf(pr, options).method;
        counts[m] = (counts[m] ?? 0) + 1;
      }
      console.log(`fast path allowed: ${fast}, kernels: ${kernels}; fits by method: ${JSON.stringify(counts)}`);
      if (fast) expect(counts.normal ?? 0).toBeGreaterThanOrEqual(5);
      else expect(counts.normal ?? 0).toBe(0);
    });
  });
});

describe(`distribution functions against mpmath (${SOURCE})`, () => {
  it("two-sided t p-values", () => {
    for (const c of ref.distributions.tTwoSided) expect(relErr(tTwoSided(c.t, c.df), c.p), JSON.stringify(c)).toBeLessThan(1e-12);
  });
  it("F upper tails", () => {
    for (const c of ref.distributions.fUpper) expect(relErr(fUpper(c.f, c.d1, c.d2), c.p), JSON.stringify(c)).toBeLessThan(1e-12);
  });
  it("t quantiles", () => {
    for (const c of ref.distributions.tQuantile) expect(relErr(tQuantile(c.p, c.df), c.q), JSON.stringify(c)).toBeLessThan(1e-12);
  });
});
