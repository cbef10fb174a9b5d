/**
 * Certified accuracy: the 11 NIST StRD linear least-squares datasets
 * (NIST Information Technology Laboratory, Statistical Reference Datasets; files read from
 * ../shared/refdata/nist-strd/). Every coefficient, standard error, the residual standard
 * deviation and R² must agree with NIST's certified values to at least 13 significant digits
 * (log relative error; absolute error where the certified value is 0, as for the exact fits
 * Wampler1 and Wampler2). Polynomial datasets are fitted through the degree option.
 */
import { describe, expect, it } from "vitest";
import { digits, loadNist } from "./helpers/nist";
import { fitNist, nistDigits } from "./helpers/nistfit";

const sets = loadNist();
const REQUIRED = 13;

describe.skipIf(!sets)("NIST StRD certified values (source: NIST StRD, ../shared/refdata/nist-strd)", () => {
  for (const d of sets ?? []) {
    it(`${d.name}: ≥ ${REQUIRED} digits in coefficients, standard errors, residual SD and R²`, () => {
      const got = nistDigits(d, digits);
      const msg = `${d.name}: ${JSON.stringify(got)} (need ${REQUIRED})`;
      expect(got.rank, msg).toBe(d.certified.coefficients.length);
      expect(got.coefficients, msg).toBeGreaterThanOrEqual(REQUIRED);
      expect(got.standardErrors, msg).toBeGreaterThanOrEqual(REQUIRED);
      expect(got.residualSd, msg).toBeGreaterThanOrEqual(REQUIRED);
      expect(got.rSquared, msg).toBeGreaterThanOrEqual(REQUIRED);
    });
  }

  it("residual degrees of freedom and RSS match the certified ANOVA rows", () => {
    for (const d of sets ?? []) {
      const fit = fitNist(d);
      const st = fit.statistics();
      expect(st.residualDf, d.name).toBe(d.certified.residualDegreesOfFreedom);
      const rss = typeof st.rss === "number" ? st.rss : NaN;
      expect(digits(rss, d.certified.residualSumOfSquares), d.name).toBeGreaterThanOrEqual(REQUIRED);
    }
  });

  it("F statistic matches where certified (12 digits) and is unbounded or enormous for the exact fits", () => {
    for (const d of sets ?? []) {
      const st = fitNist(d).statistics();
      // Certified F is Infinity for the exact fits. Wampler1's data are exact in binary, so the
      // residuals are exactly zero and F is not available; Wampler2's decimal data round, leaving
      // residuals of order 1e-16 and a finite but enormous F.
      if (d.certified.fStatistic === null) {
        if (typeof st.fStatistic === "number") expect(st.fStatistic, d.name).toBeGreaterThan(1e20);
      }
      else expect(digits(st.fStatistic as number, d.certified.fStatistic), d.name).toBeGreaterThanOrEqual(12);
    }
  });
});
