/**
 * The calibration functions (INVERSE, LIMITS, GOF) and known uncertainties (weighting
 * "uncertainty"), called through the built bundle as the host calls them.
 *
 * 1. Published worked examples, matched to the digits printed (sources named in each test).
 * 2. Full-precision references for the same problems and invented ones, computed independently in
 *    50-digit arithmetic by scripts/gen-calibration.py (Debian's python3-mpmath), matched to
 *    12 significant digits or more.
 */
import { readFileSync } from "node:fs";
import { resolve } from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { col, HostError, loadHost, type Host } from "./helpers/host";
import { tQuantile } from "../src/core/distributions";

let host: Host;
beforeAll(() => {
  host = loadHost();
});

/** Round to d decimals, as a publication prints. */
const round = (v: number, d: number): number => Math.round(v * 10 ** d) / 10 ** d;
const num = (v: unknown): number => {
  if (typeof v !== "number") throw new Error(`expected a number, got ${JSON.stringify(v)}`);
  return v;
};
const rel = (got: number, want: number): number => (want === 0 ? Math.abs(got) : Math.abs(got - want) / Math.abs(want));
const byLabel = (grid: unknown[][]): Record<string, unknown> => Object.fromEntries(grid.map((r) => [r[0] as string, r[1]]));

describe("published worked examples (to the digits printed)", () => {
  it("Massart et al., Handbook of Chemometrics and Qualimetrics (1997), Part A, ch. 8: x₀ ± t·s(x₀) at 95 %", () => {
    const x = col([0, 10, 20, 30, 40, 50]);
    const y = col([4.0, 21.2, 44.6, 61.8, 78.0, 105.2]);
    const t = tQuantile(0.975, 4);
    const one = host.call("INVERSE", { newy: col([15, 90]), y, x }) as number[][];
    expect(round(one[0]![0]!, 1)).toBe(6.1);
    expect(round(t * one[0]![1]!, 1)).toBe(4.9);
    expect(round(one[1]![0]!, 1)).toBe(43.9);
    expect(round(t * one[1]![1]!, 1)).toBe(4.9);
    const five = host.call("INVERSE", { newy: [[90]], y, x, replicates: 5 }) as number[][];
    expect(round(five[0]![0]!, 1)).toBe(43.9);
    expect(round(t * five[0]![1]!, 1)).toBe(3.2);
    // the Fieller limits bracket the estimate and are close to, but not exactly, ± t·s(x₀)
    expect(one[0]![2]!).toBeLessThan(one[0]![0]!);
    expect(one[0]![3]!).toBeGreaterThan(one[0]![0]!);
  });

  it("ISO/TS 28037:2010 clause 6, example 1: a, b, u(a), u(b), cov(a, b), χ², ν; clause 11: x₁ and u(x₁)", () => {
    const args = { y: col([3.3, 5.6, 7.1, 9.3, 10.7, 12.1]), x: col([1, 2, 3, 4, 5, 6]), weights: col([0.5, 0.5, 0.5, 0.5, 0.5, 0.5]), weighting: "uncertainty" };
    const p = host.call("PARAMS", args) as number[][];
    expect(round(p[0]![0]!, 3)).toBe(1.867);
    expect(round(p[0]![1]!, 3)).toBe(0.465);
    expect(round(p[1]![0]!, 3)).toBe(1.757);
    expect(round(p[1]![1]!, 3)).toBe(0.12);
    const c = host.call("COV", args) as number[][];
    expect(round(c[0]![1]!, 3)).toBe(-0.05);
    const g = byLabel(host.call("GOF", args) as unknown[][]);
    expect(round(num(g["χ² (known uncertainties)"]), 3)).toBe(1.665);
    expect(g["χ² degrees of freedom"]).toBe(4);
    const inv = host.call("INVERSE", { newy: [[10.5]], ...args, ureading: 0.5 }) as number[][];
    expect(round(inv[0]![0]!, 3)).toBe(4.913);
    expect(round(inv[0]![1]!, 3)).toBe(0.322);
  });

  it("ISO/TS 28037:2010 clause 6, example 2: a, b, u(a), u(b), cov(a, b), χ²; clause 11: x₁ and u(x₁)", () => {
    const args = { y: col([3.2, 4.3, 7.6, 8.6, 11.7, 12.8]), x: col([1, 2, 3, 4, 5, 6]), weights: col([0.5, 0.5, 0.5, 1, 1, 1]), weighting: "uncertainty" };
    const p = host.call("PARAMS", args) as number[][];
    expect(round(p[0]![0]!, 3)).toBe(0.885);
    expect(round(p[0]![1]!, 3)).toBe(0.53);
    expect(round(p[1]![0]!, 3)).toBe(2.057);
    expect(round(p[1]![1]!, 3)).toBe(0.178);
    const c = host.call("COV", args) as number[][];
    expect(round(c[0]![1]!, 3)).toBe(-0.082);
    const g = byLabel(host.call("GOF", args) as unknown[][]);
    expect(round(num(g["χ² (known uncertainties)"]), 3)).toBe(4.131);
    const inv = host.call("INVERSE", { newy: [[10.5]], ...args, ureading: 1.0 }) as number[][];
    expect(round(inv[0]![0]!, 3)).toBe(4.674);
    expect(round(inv[0]![1]!, 3)).toBe(0.533);
  });

  it("DIN 32645 example: decision limit 0.07, detection limit 0.14, quantitation limit 0.21 (α = β = 0.01, k = 3, one measurement)", () => {
    const x = col([0.05, 0.1, 0.15, 0.2, 0.25, 0.3, 0.35, 0.4, 0.45, 0.5]);
    const y = col([3060, 3522, 3707, 4280, 5058, 5510, 5703, 6205, 7156, 7178]);
    const l = byLabel(host.call("LIMITS", { y, x, alpha: 0.01, beta: 0.01, k: 3, samples: 1 }) as unknown[][]);
    expect(round(num(l["decision limit (critical value, x units)"]), 2)).toBe(0.07);
    expect(round(num(l["limit of detection (x units)"]), 2)).toBe(0.14);
    expect(round(num(l["limit of quantitation (x units)"]), 2)).toBe(0.21);
  });

  it("NIST/SEMATECH e-Handbook §4.6.1.5, load cell (NIST StRD Pontius data), straight line: B0, B1 and the lack-of-fit F on 18 and 20 df (6 significant digits)", () => {
    const text = readFileSync(resolve(__dirname, "fixtures/nist-strd/Pontius.dat"), "utf8").split("\n");
    const rows = text.slice(60, 100).map((l) => l.trim().split(/\s+/).map(Number));
    const y = rows.map((r) => [r[0]]);
    const x = rows.map((r) => [r[1]]);
    const b = host.call("COEF", { y, x }) as number[][];
    expect(rel(b[0]![0]!, 0.614969e-2)).toBeLessThan(5e-6);
    expect(rel(b[1]![0]!, 0.722103e-6)).toBeLessThan(5e-6);
    const g = byLabel(host.call("GOF", { y, x }) as unknown[][]);
    expect(g["lack-of-fit degrees of freedom"]).toBe(18);
    expect(g["pure-error degrees of freedom"]).toBe(20);
    expect(rel(num(g["lack-of-fit F"]), 214.7464)).toBeLessThan(5e-6);
    // and CHECK reports the lack of fit as a problem, never "No problems found"
    const check = (host.call("CHECK", { y, x }) as string[][]).map((r) => r[0]!);
    expect(check.some((t) => t.includes("lack-of-fit F"))).toBe(true);
    expect(check.some((t) => t.startsWith("No problems found"))).toBe(false);
  });
});

interface Case {
  name: string;
  source: string;
  x: number[];
  y: number[];
  weights: number[] | null;
  intercept: boolean;
  degree: number;
  weighting: string;
  coefficients: number[];
  standardErrors: number[];
  covariance: number[][];
  rss: number;
  df: number;
  chi2?: { chi2: number; df: number; p: number; reduced: number };
  inverse: { y0: number; replicates: number; level: number; ureading: number | null; x: number; u: number; lower: number; upper: number }[];
  lackOfFit?: { sumSquares: number; df: number; pureErrorSumSquares: number; pureErrorDf: number; F: number; p: number };
  addedTerm?: { term: string; t: number; p: number };
  limits?: { alpha: number; beta: number; k: number; samples: number; decision: number; detection: number; quantitation: number; criticalResponse: number; ichDetection: number; ichQuantitation: number };
}

const ref = JSON.parse(readFileSync(resolve(__dirname, "fixtures/calibration.json"), "utf8")) as { generator: string; seed: number; mpmath: string; cases: Case[] };
const SOURCE = `${ref.generator} (seed ${ref.seed}, mpmath ${ref.mpmath}, 50 digits)`;
const DIGITS = 1e-12;

describe(`full-precision references from ${SOURCE}`, () => {
  for (const c of ref.cases) {
    const fitArgs = { y: col(c.y), x: col(c.x), weights: c.weights ? col(c.weights) : null, intercept: c.intercept, degree: c.degree, weighting: c.weighting };
    it(`${c.name} (${c.source}): coefficients, standard errors and covariance`, () => {
      const p = host.call("PARAMS", fitArgs) as number[][];
      c.coefficients.forEach((v, j) => expect(rel(p[j]![0]!, v), `coefficient ${j}`).toBeLessThan(DIGITS));
      c.standardErrors.forEach((v, j) => expect(rel(p[j]![1]!, v), `standard error ${j}`).toBeLessThan(DIGITS));
      const cov = host.call("COV", fitArgs) as number[][];
      const scale = (i: number, j: number) => Math.sqrt(Math.abs(c.covariance[i]![i]! * c.covariance[j]![j]!));
      c.covariance.forEach((row, i) => row.forEach((v, j) => expect(Math.abs(cov[i]![j]! - v) / scale(i, j), `covariance (${i}, ${j})`).toBeLessThan(DIGITS)));
    });
    if (c.inverse.length > 0)
      it(`${c.name}: INVERSE estimate, standard uncertainty and limits`, () => {
        for (const r of c.inverse) {
          const got = host.call("INVERSE", { newy: [[r.y0]], ...fitArgs, level: r.level, replicates: r.replicates, ureading: r.ureading }) as number[][];
          const [x, u, lo, hi] = got[0]!;
          const what = `reading ${r.y0} (k = ${r.replicates}, level ${r.level})`;
          expect(rel(x!, r.x), `${what}: x`).toBeLessThan(DIGITS);
          expect(rel(u!, r.u), `${what}: u`).toBeLessThan(DIGITS);
          expect(rel(lo!, r.lower), `${what}: lower`).toBeLessThan(DIGITS);
          expect(rel(hi!, r.upper), `${what}: upper`).toBeLessThan(DIGITS);
        }
      });
    it(`${c.name}: GOF (lack of fit, χ², added term)`, () => {
      const g = byLabel(host.call("GOF", fitArgs) as unknown[][]);
      if (c.lackOfFit) {
        expect(rel(num(g["lack-of-fit sum of squares"]), c.lackOfFit.sumSquares), "SS lack of fit").toBeLessThan(1e-10);
        expect(rel(num(g["pure-error sum of squares"]), c.lackOfFit.pureErrorSumSquares), "SS pure error").toBeLessThan(DIGITS);
        expect(g["lack-of-fit degrees of freedom"]).toBe(c.lackOfFit.df);
        expect(g["pure-error degrees of freedom"]).toBe(c.lackOfFit.pureErrorDf);
        expect(rel(num(g["lack-of-fit F"]), c.lackOfFit.F), "F").toBeLessThan(1e-10);
        expect(rel(num(g["p-value of lack-of-fit F"]), c.lackOfFit.p), "p").toBeLessThan(1e-9);
      } else expect(g["lack-of-fit F"]).toBeInstanceOf(HostError);
      if (c.chi2) {
        expect(rel(num(g["χ² (known uncertainties)"]), c.chi2.chi2), "χ²").toBeLessThan(DIGITS);
        expect(rel(num(g["p-value of χ²"]), c.chi2.p), "p of χ²").toBeLessThan(1e-10);
        expect(rel(num(g["reduced χ²"]), c.chi2.reduced), "reduced χ²").toBeLessThan(DIGITS);
      } else expect(g["χ² (known uncertainties)"]).toBeInstanceOf(HostError);
      if (c.addedTerm) {
        expect(g["term added to test curvature"]).toBe(c.addedTerm.term);
        expect(rel(num(g["t of the added term"]), c.addedTerm.t), "t").toBeLessThan(1e-10);
        expect(rel(num(g["p-value of the added term"]), c.addedTerm.p), "p").toBeLessThan(1e-9);
      }
    });
    if (c.limits) {
      const L = c.limits;
      it(`${c.name}: LIMITS, calibration-line method and ICH Q2`, () => {
        const l = byLabel(host.call("LIMITS", { ...fitArgs, alpha: L.alpha, beta: L.beta, k: L.k, samples: L.samples }) as unknown[][]);
        expect(rel(num(l["decision limit (critical value, x units)"]), L.decision)).toBeLessThan(DIGITS);
        expect(rel(num(l["limit of detection (x units)"]), L.detection)).toBeLessThan(DIGITS);
        expect(rel(num(l["limit of quantitation (x units)"]), L.quantitation)).toBeLessThan(DIGITS);
        expect(rel(num(l["critical response (y units)"]), L.criticalResponse)).toBeLessThan(DIGITS);
        const ich = byLabel(host.call("LIMITS", { ...fitArgs, method: "ich" }) as unknown[][]);
        expect(rel(num(ich["limit of detection (x units)"]), L.ichDetection)).toBeLessThan(DIGITS);
        expect(rel(num(ich["limit of quantitation (x units)"]), L.ichQuantitation)).toBeLessThan(DIGITS);
        expect(ich["decision limit (critical value, x units)"]).toBeInstanceOf(HostError);
      });
    }
  }
});

describe("calibration conventions and refusals", () => {
  const x = col([1, 2, 3, 4, 5, 6, 7]);
  const y = col([2.1, 3.9, 6.2, 7.8, 10.1, 12.2, 13.8]);
  it("INVERSE keeps newy's orientation and gives one row per reading; headers add a header row", () => {
    const out = host.call("INVERSE", { newy: [[5, 9, 11]], y, x }) as unknown[][];
    expect(out.length).toBe(3);
    expect(out[0]!.length).toBe(4);
    const h = host.call("INVERSE", { newy: [[5]], y, x, headers: true }) as unknown[][];
    expect(h[0]).toEqual(["x", "standard uncertainty", "lower limit", "upper limit"]);
  });
  it("a slope that is not significant at the level gives #N/A limits with the reason, but the estimate and its uncertainty", () => {
    const flat = col([5.0, 5.3, 4.8, 5.2, 4.9, 5.1, 5.05]);
    const out = host.call("INVERSE", { newy: [[5]], y: flat, x }) as unknown[][];
    expect(typeof out[0]![0]).toBe("number");
    expect((out[0]![2] as HostError).code).toBe("#N/A");
    expect((out[0]![2] as HostError).message).toMatch(/slope is not significant/);
  });
  it("a polynomial with no root, or two, inside the calibrated range gives #N/A with the reason", () => {
    const xs = col([0, 1, 2, 3, 4, 5, 6]);
    const ys = col([0.1, 5.2, 7.9, 9.1, 8.1, 4.9, 0.2]); // rises, then falls
    const out = host.call("INVERSE", { newy: col([6, 20]), y: ys, x: xs, degree: 2 }) as HostError[][];
    expect(out[0]![0]!.message).toMatch(/2 places in the calibrated range/);
    expect(out[1]![0]!.message).toMatch(/no x in the calibrated range/);
  });
  it("CHECK names readings outside the calibrated range (newy) and new points outside the data (newx)", () => {
    const out = (host.call("CHECK", { y, x, newx: col([3.5, 12]), newy: col([8, 40]) }) as string[][]).map((r) => r[0]!);
    expect(out.some((t) => /^New row 2 of newx lies outside the range of the data/.test(t))).toBe(true);
    expect(out.some((t) => /^Reading 2 of newy lies outside the calibrated range/.test(t))).toBe(true);
  });
  it("LIMITS refuses what the method does not cover, with the reason", () => {
    const w = host.call("LIMITS", { y, x, weights: col([1, 1, 1, 2, 2, 2, 2]) }) as unknown[][];
    expect((w[0]![1] as HostError).message).toMatch(/weighted/);
    const q = host.call("LIMITS", { y, x, degree: 2 }) as unknown[][];
    expect((q[0]![1] as HostError).message).toMatch(/straight-line calibrations only/);
  });
  it("with known uncertainties, INVERSE without the reading's uncertainty gives the estimate and says what is missing", () => {
    const out = host.call("INVERSE", { newy: [[7]], y, x, weights: col([0.2, 0.2, 0.2, 0.2, 0.2, 0.2, 0.2]), weighting: "uncertainty" }) as unknown[][];
    expect(typeof out[0]![0]).toBe("number");
    expect((out[0]![1] as HostError).message).toMatch(/ureading/);
  });
});
