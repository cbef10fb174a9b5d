/**
 * The t and F distribution functions (stdlib-js) against a published statistical table: the
 * critical values of Student's t and of F at the upper 5 % point as printed (3 decimals) in the
 * NIST/SEMATECH e-Handbook of Statistical Methods, sections 1.3.6.7.2 and 1.3.6.7.3. The values
 * below are quoted from memory of those tables; test/reference.test.ts checks the same functions
 * against mpmath to 1e-12.
 */
import { describe, expect, it } from "vitest";
import { fUpper, tQuantile, tTwoSided } from "../src/core/distributions";

// [degrees of freedom, upper-tail probability, tabulated critical value]
const T_TABLE: [number, number, number][] = [
  [1, 0.025, 12.706],
  [2, 0.025, 4.303],
  [5, 0.025, 2.571],
  [10, 0.025, 2.228],
  [20, 0.025, 2.086],
  [30, 0.025, 2.042],
  [10, 0.005, 3.169],
  [5, 0.05, 2.015],
];
// [numerator df, denominator df, tabulated 5 % point]
const F_TABLE: [number, number, number][] = [
  [1, 10, 4.965],
  [2, 10, 4.103],
  [5, 10, 3.326],
  [10, 20, 2.348],
];

describe("Student's t against the NIST/SEMATECH e-Handbook table (from memory, 3 decimals)", () => {
  for (const [df, a, v] of T_TABLE)
    it(`t(${1 - a}, ${df}) = ${v}`, () => {
      expect(Math.abs(tQuantile(1 - a, df) - v)).toBeLessThanOrEqual(0.0005);
      // the two-sided tail at the tabulated value brackets 2a within the table's rounding
      expect(tTwoSided(v - 0.0005, df)).toBeGreaterThan(2 * a);
      expect(tTwoSided(v + 0.0005, df)).toBeLessThan(2 * a);
    });
});

describe("F upper 5 % points against the NIST/SEMATECH e-Handbook table (from memory, 3 decimals)", () => {
  for (const [d1, d2, v] of F_TABLE)
    it(`F(0.95; ${d1}, ${d2}) = ${v}`, () => {
      expect(fUpper(v - 0.0005, d1, d2)).toBeGreaterThan(0.05);
      expect(fUpper(v + 0.0005, d1, d2)).toBeLessThan(0.05);
    });
});
