/**
 * LSQ.LINEXY, a straight line with uncertainties in x and y (generalized distance regression,
 * York's method), through the built bundle as the host calls it:
 * - ISO/TS 28037:2010 clause 7 example, to the digits printed;
 * - Deming's closed-form slope and the orthogonal (total least squares) line from an SVD, and
 *   invented problems (correlated errors, wildly different uncertainties, 2 and 3 rows), all
 *   computed independently in 50-digit arithmetic by scripts/gen-calibration.py (Debian's
 *   python3-mpmath), to 12 digits;
 * - the ordinary weighted line (LSQ.COEF with weights 1/u_y²) as the limit u_x = 0, to 13 digits.
 */
import { readFileSync } from "node:fs";
import { resolve } from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { col, HostError, loadHost, outcome, type Host } from "./helpers/host";

let host: Host;
beforeAll(() => {
  host = loadHost();
});

const round = (v: unknown, d: number): number => Math.round((v as number) * 10 ** d) / 10 ** d;
const rel = (got: unknown, want: number): number => {
  if (typeof got !== "number") throw new Error(`expected a number, got ${JSON.stringify(got)}`);
  return want === 0 ? Math.abs(got) : Math.abs(got - want) / Math.abs(want);
};

describe("ISO/TS 28037:2010 clause 7 example (to the digits printed)", () => {
  it("a = 0.5788 (u 0.4764), b = 2.1597 (u 0.1355), cov(a, b) = −0.0577, χ² = 2.743", () => {
    const r = host.call("LINEXY", {
      y: col([3.4, 4.4, 7.2, 8.5, 10.8, 13.5]),
      x: col([1.2, 1.9, 2.9, 4.0, 4.7, 5.9]),
      uy: col([0.2, 0.2, 0.2, 0.4, 0.4, 0.4]),
      ux: [[0.2]],
    }) as unknown[][];
    expect(r[0]).toEqual(["", "estimate", "standard uncertainty", "lower limit", "upper limit"]);
    expect(r[1]![0]).toBe("intercept");
    expect(round(r[1]![1], 4)).toBe(0.5788);
    expect(round(r[1]![2], 4)).toBe(0.4764);
    expect(round(r[2]![1], 4)).toBe(2.1597);
    expect(round(r[2]![2], 4)).toBe(0.1355);
    expect(round(r[3]![1], 4)).toBe(-0.0577);
    expect(round(r[4]![1], 3)).toBe(2.743);
    expect(r[5]![1]).toBe(4);
    expect(r[8]![1]).toBe(6);
    expect(r[9]![1]).toBe(0);
  });
});

interface LineCase {
  name: string;
  source: string;
  x: number[];
  y: number[];
  ux: number[];
  uy: number[];
  r: number[];
  level: number;
  intercept: number;
  slope: number;
  uIntercept: number;
  uSlope: number;
  covariance: number;
  chi2: number;
  df: number;
  p: number | null;
  lowerIntercept: number;
  upperIntercept: number;
  lowerSlope: number;
  upperSlope: number;
  deming?: [number, number];
  orthogonal?: [number, number];
}

const ref = JSON.parse(readFileSync(resolve(__dirname, "fixtures/calibration.json"), "utf8")) as { generator: string; seed: number; mpmath: string; linexy: LineCase[] };
const SOURCE = `${ref.generator} (seed ${ref.seed}, mpmath ${ref.mpmath})`;

describe(`references from ${SOURCE}`, () => {
  for (const c of ref.linexy) {
    it(`${c.name} (${c.source}): estimates, uncertainties, covariance, limits and χ² to 12 digits`, () => {
      const r = host.call("LINEXY", { y: col(c.y), x: col(c.x), uy: col(c.uy), ux: col(c.ux), correlation: col(c.r), level: c.level }) as unknown[][];
      const tol = 1e-12;
      expect(rel(r[1]![1], c.intercept), "intercept").toBeLessThan(tol);
      expect(rel(r[2]![1], c.slope), "slope").toBeLessThan(tol);
      expect(rel(r[1]![2], c.uIntercept), "u(intercept)").toBeLessThan(tol);
      expect(rel(r[2]![2], c.uSlope), "u(slope)").toBeLessThan(tol);
      expect(rel(r[3]![1], c.covariance), "covariance").toBeLessThan(tol);
      expect(rel(r[1]![3], c.lowerIntercept), "lower limit of the intercept").toBeLessThan(tol);
      expect(rel(r[2]![4], c.upperSlope), "upper limit of the slope").toBeLessThan(tol);
      if (c.chi2 > 1e-20) expect(rel(r[4]![1], c.chi2), "χ²").toBeLessThan(1e-11);
      else expect(Math.abs(r[4]![1] as number)).toBeLessThan(1e-20);
      expect(r[5]![1]).toBe(c.df);
      if (c.p === null) expect(r[6]![1]).toBeInstanceOf(HostError);
      else expect(rel(r[6]![1], c.p), "p").toBeLessThan(1e-10);
      if (c.deming) {
        expect(rel(r[1]![1], c.deming[0]), "Deming intercept").toBeLessThan(tol);
        expect(rel(r[2]![1], c.deming[1]), "Deming slope").toBeLessThan(tol);
      }
      if (c.orthogonal) {
        expect(rel(r[1]![1], c.orthogonal[0]), "orthogonal intercept").toBeLessThan(tol);
        expect(rel(r[2]![1], c.orthogonal[1]), "orthogonal slope").toBeLessThan(tol);
      }
    });
  }
});

describe("limits, skipped rows and refusals", () => {
  const x = col([1.0, 2.1, 2.9, 4.2, 5.0, 6.1, 6.9]);
  const y = col([2.2, 4.1, 6.3, 8.0, 10.2, 12.1, 14.3]);
  const uy = col([0.1, 0.1, 0.15, 0.1, 0.2, 0.1, 0.12]);
  it("with every u_x = 0 it is LSQ.COEF's weighted line with weights 1/u_y² (13 digits)", () => {
    const line = host.call("LINEXY", { y, x, uy, ux: [[0]] }) as unknown[][];
    const coef = host.call("COEF", { y, x, weights: uy, weighting: "uncertainty" }) as number[][];
    const params = host.call("PARAMS", { y, x, weights: uy, weighting: "uncertainty" }) as number[][];
    expect(rel(line[1]![1], coef[0]![0]!)).toBeLessThan(1e-13);
    expect(rel(line[2]![1], coef[1]![0]!)).toBeLessThan(1e-13);
    expect(rel(line[1]![2], params[0]![1]!)).toBeLessThan(1e-13);
    expect(rel(line[2]![2], params[1]![1]!)).toBeLessThan(1e-13);
  });
  it("skips rows with a missing value or uncertainty and says how many", () => {
    const r = host.call("LINEXY", { y: col([2.2, "", 6.3, 8.0, 10.2]), x: col([1, 2, 3, 4, 5]), uy: col([0.1, 0.1, null, 0.1, 0.1]), ux: [[0.05]] }) as unknown[][];
    expect(r[8]![1]).toBe(3);
    expect(r[9]![1]).toBe(2);
  });
  it("a negative uncertainty, or both zero in one row, is #VALUE! naming the row", () => {
    const neg = outcome(host, "LINEXY", { y, x, uy, ux: col([0.1, 0.1, -0.1, 0.1, 0.1, 0.1, 0.1]) });
    expect(neg.error?.code).toBe("#VALUE!");
    expect(neg.error?.message).toMatch(/x uncertainty in row 3 is negative/);
    const both = outcome(host, "LINEXY", { y, x, uy: col([0.1, 0.1, 0.1, 0.1, 0, 0.1, 0.1]), ux: col([0.1, 0.1, 0.1, 0.1, 0, 0.1, 0.1]) });
    expect(both.error?.message).toMatch(/row 5 has zero uncertainty in both x and y, so it cannot be weighted/);
  });
  it("vertical data (every x the same) give #N/A with the reason, never a hang", () => {
    const r = host.call("LINEXY", { y: col([1, 2, 3, 4]), x: col([2, 2, 2, 2]), uy: [[0.1]], ux: [[0.1]] }) as unknown[][];
    expect((r[2]![1] as HostError).code).toBe("#N/A");
    expect((r[2]![1] as HostError).message).toMatch(/same x/);
  });
});
