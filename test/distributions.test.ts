/**
 * The distribution functions (stdlib-js) against references computed in 50-digit arithmetic with
 * Debian's python3-mpmath by scripts/gen-calibration.py (regularized incomplete beta and gamma
 * functions, erfinv, root finding): t and normal quantiles, F and χ² upper tails, to 1e-12
 * relative. test/reference.test.ts checks two-sided t p-values the same way.
 */
import { readFileSync } from "node:fs";
import { resolve } from "node:path";
import { describe, expect, it } from "vitest";
import { chiSquareUpper, fUpper, normalQuantile, normalTwoSided, tQuantile } from "../src/core/distributions";

const ref = JSON.parse(readFileSync(resolve(__dirname, "fixtures/calibration.json"), "utf8")) as {
  generator: string;
  mpmath: string;
  distributions: {
    tQuantile: { p: number; df: number; q: number }[];
    fUpper: { f: number; d1: number; d2: number; p: number }[];
    normalQuantile: { p: number; q: number }[];
    chiSquareUpper: { x: number; k: number; p: number }[];
  };
};
const SOURCE = `${ref.generator}, mpmath ${ref.mpmath}`;
const rel = (got: number, want: number): number => (want === 0 ? Math.abs(got) : Math.abs(got - want) / Math.abs(want));

describe(`distribution functions against mpmath (${SOURCE})`, () => {
  it("t quantiles", () => {
    for (const c of ref.distributions.tQuantile) expect(rel(tQuantile(c.p, c.df), c.q), JSON.stringify(c)).toBeLessThan(1e-12);
  });
  it("F upper tails", () => {
    for (const c of ref.distributions.fUpper) expect(rel(fUpper(c.f, c.d1, c.d2), c.p), JSON.stringify(c)).toBeLessThan(1e-12);
  });
  it("normal quantiles, and the two-sided normal tail at them", () => {
    for (const c of ref.distributions.normalQuantile) {
      expect(rel(normalQuantile(c.p), c.q), JSON.stringify(c)).toBeLessThan(1e-12);
      if (c.p > 0.5) expect(rel(normalTwoSided(c.q), 2 * (1 - c.p)), JSON.stringify(c)).toBeLessThan(1e-11);
    }
  });
  it("χ² upper tails, small p-values keeping their relative accuracy", () => {
    for (const c of ref.distributions.chiSquareUpper) expect(rel(chiSquareUpper(c.x, c.k), c.p), JSON.stringify(c)).toBeLessThan(1e-12);
  });
});
