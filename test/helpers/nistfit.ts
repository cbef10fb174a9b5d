/** Fit a NIST StRD dataset with the engine, the way its model is stated in the file. */
import { LeastSquaresFit, type FitOptions } from "../../src/core/fit";
import type { NistDataset } from "./nist";

export function fitNist(d: NistDataset, options: FitOptions = {}): LeastSquaresFit {
  const m = d.rows.length;
  const k = d.predictors.columns ?? 1;
  const y = Float64Array.from(d.rows.map((r) => r[0]!));
  const x = new Float64Array(m * k);
  for (let j = 0; j < k; j++) for (let i = 0; i < m; i++) x[j * m + i] = d.rows[i]![j + 1]!;
  return new LeastSquaresFit({ y, x, rows: m, cols: k, intercept: d.intercept, degree: d.predictors.polynomialDegree ?? 1 }, options);
}

export interface NistDigits {
  name: string;
  coefficients: number;
  standardErrors: number;
  residualSd: number;
  rSquared: number;
  rank: number;
}

/** Minimum digits of agreement per certified quantity. */
export function nistDigits(d: NistDataset, digits: (got: number, cert: number) => number): NistDigits {
  const fit = fitNist(d);
  const b = fit.coefficients();
  const table = fit.parameterTable(0.95);
  const st = fit.statistics();
  const num = (q: unknown): number => (typeof q === "number" ? q : NaN);
  return {
    name: d.name,
    coefficients: Math.min(...d.certified.coefficients.map((c, i) => digits(b[i]!, c))),
    standardErrors: Math.min(...d.certified.standardErrors.map((c, i) => digits(num(table[i]!.standardError), c))),
    residualSd: digits(num(st.sigma), d.certified.residualStandardDeviation),
    rSquared: digits(num(st.rSquared), d.certified.rSquared),
    rank: fit.rank,
  };
}
