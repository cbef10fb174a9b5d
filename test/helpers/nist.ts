/**
 * Loader for the NIST StRD linear least-squares datasets in ../shared/refdata/nist-strd/
 * (read from there, never copied). Returns null, after printing a notice, when the folder is
 * absent (a user's clone has no ../shared).
 */
import { existsSync, readFileSync } from "node:fs";
import { resolve } from "node:path";

export const NIST_DIR = resolve(__dirname, "../../../shared/refdata/nist-strd");

export interface NistCertified {
  coefficients: number[];
  standardErrors: number[];
  residualStandardDeviation: number;
  rSquared: number;
  residualSumOfSquares: number;
  residualDegreesOfFreedom: number;
  fStatistic: number | null;
}

export interface NistDataset {
  name: string;
  intercept: boolean;
  predictors: { polynomialDegree?: number; columns?: number };
  certified: NistCertified;
  /** Data rows parsed from the .dat file by the header's line numbers: [y, x1, …]. */
  rows: number[][];
}

let notified = false;

export function loadNist(): NistDataset[] | null {
  const index = resolve(NIST_DIR, "datasets.json");
  if (!existsSync(index)) {
    if (!notified) console.log(`NOTICE: NIST StRD reference data not found at ${NIST_DIR}; skipping the certified-value checks.`);
    notified = true;
    return null;
  }
  const meta = JSON.parse(readFileSync(index, "utf8")) as (Omit<NistDataset, "rows"> & { file: string; dataLines: [number, number] })[];
  return meta.map((d) => {
    const lines = readFileSync(resolve(NIST_DIR, d.file), "utf8").split("\n");
    const rows = lines.slice(d.dataLines[0] - 1, d.dataLines[1]).map((l) => l.trim().split(/\s+/).map(Number));
    return { name: d.name, intercept: d.intercept, predictors: d.predictors, certified: d.certified, rows };
  });
}

/** Log relative error (digits of agreement); absolute error when the certified value is 0. Capped at 15. */
export function digits(got: number, cert: number): number {
  if (!Number.isFinite(got)) return 0;
  const err = cert === 0 ? Math.abs(got) : Math.abs(got - cert) / Math.abs(cert);
  if (err === 0) return 15;
  return Math.min(15, Math.max(0, -Math.log10(err)));
}
