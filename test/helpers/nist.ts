/**
 * Loader for the NIST StRD linear least-squares datasets committed in test/fixtures/nist-strd/
 * (the .dat files exactly as NIST publishes them; public-domain works of the U.S. Government,
 * source and provenance in that folder's README). Everything — the data, the model and the
 * certified values — is parsed here from the files themselves, by the line numbers their headers
 * state, so a fresh clone checks the README's accuracy claims with nothing else.
 */
import { readdirSync, readFileSync } from "node:fs";
import { resolve } from "node:path";

export const NIST_DIR = resolve(__dirname, "../fixtures/nist-strd");

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

/** The order of NIST's own table of the datasets (lower, average, higher difficulty). */
const ORDER = ["Norris", "Pontius", "NoInt1", "NoInt2", "Filip", "Longley", "Wampler1", "Wampler2", "Wampler3", "Wampler4", "Wampler5"];

const num = (s: string): number => (/^[-+]?infinity$/i.test(s) ? Infinity : Number(s));

/** Parse one StRD .dat file. */
export function parseNist(name: string, text: string): NistDataset {
  const lines = text.split("\n");
  const range = (what: string): [number, number] => {
    const m = new RegExp(`${what}\\s*\\(lines\\s+(\\d+)\\s+to\\s+(\\d+)\\)`).exec(text);
    if (!m) throw new Error(`${name}: no "${what} (lines a to b)" in the header`);
    return [Number(m[1]), Number(m[2])];
  };
  const [c0, c1] = range("Certified Values");
  const [d0, d1] = range("Data");
  const cert = lines.slice(c0 - 1, c1);
  const params: { name: string; est: number; sd: number }[] = [];
  let sd = NaN;
  let r2 = NaN;
  let rss = NaN;
  let rdf = NaN;
  let F: number | null = null;
  for (const l of cert) {
    const t = l.trim().split(/\s+/);
    if (/^B\d+$/.test(t[0] ?? "")) params.push({ name: t[0]!, est: num(t[1]!), sd: num(t[2]!) });
    else if (/^Standard Deviation/.test(l.trim())) sd = num(t[t.length - 1]!);
    else if (/^R-Squared/.test(l.trim())) r2 = num(t[t.length - 1]!);
    else if (t[0] === "Regression") F = t.length >= 5 ? num(t[4]!) : null;
    else if (t[0] === "Residual" && t.length >= 3) {
      rdf = num(t[1]!);
      rss = num(t[2]!);
    }
  }
  const rows = lines.slice(d0 - 1, d1).map((l) => l.trim().split(/\s+/).map(Number));
  const intercept = params[0]?.name === "B0";
  const columns = rows[0]!.length - 1;
  const predictors = columns > 1 ? { columns } : { polynomialDegree: params.length - (intercept ? 1 : 0) };
  return {
    name,
    intercept,
    predictors,
    certified: {
      coefficients: params.map((p) => p.est),
      standardErrors: params.map((p) => p.sd),
      residualStandardDeviation: sd,
      rSquared: r2,
      residualSumOfSquares: rss,
      residualDegreesOfFreedom: rdf,
      fStatistic: F !== null && Number.isFinite(F) ? F : null,
    },
    rows,
  };
}

/** All eleven datasets, in NIST's order. */
export function loadNist(): NistDataset[] {
  const files = new Set(readdirSync(NIST_DIR).filter((f) => f.endsWith(".dat")));
  return ORDER.filter((n) => files.has(`${n}.dat`)).map((n) => parseNist(n, readFileSync(resolve(NIST_DIR, `${n}.dat`), "utf8")));
}

/** Log relative error (digits of agreement); absolute error when the certified value is 0. Capped at 15. */
export function digits(got: number, cert: number): number {
  if (!Number.isFinite(got)) return 0;
  const err = cert === 0 ? Math.abs(got) : Math.abs(got - cert) / Math.abs(cert);
  if (err === 0) return 15;
  return Math.min(15, Math.max(0, -Math.log10(err)));
}
