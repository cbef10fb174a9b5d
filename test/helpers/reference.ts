/** The fixtures of scripts/gen-reference.py (test/fixtures/reference.json), typed. */
import { readFileSync } from "node:fs";
import { resolve } from "node:path";

export interface Problem {
  name: string;
  kind: string;
  intercept: boolean;
  rows: number;
  cols: number;
  degree: number;
  x: (number | null)[][];
  y: (number | null)[];
  weights: number[] | null;
  rank: number;
  nonIdentifiable: number[];
  coefficients: (number | null)[];
  standardErrors: (number | null)[];
  pValues: (number | null)[];
  sigma: number | null;
  rSquared: number;
  residualDf: number;
  fitted: (number | null)[];
  residuals: (number | null)[];
  leverage: (number | null)[];
  prediction: { x: number[]; value: number; seMean: number; seNew: number } | null;
  studentized: (number | null)[];
  cooks: (number | null)[];
}

export interface ReferenceFixtures {
  generator: string;
  seed: number;
  numpy: string;
  mpmath: string;
  problems: Problem[];
  distributions: {
    tTwoSided: { t: number; df: number; p: number }[];
    fUpper: { f: number; d1: number; d2: number; p: number }[];
    tQuantile: { p: number; df: number; q: number }[];
  };
}

export function loadReference(): ReferenceFixtures {
  return JSON.parse(readFileSync(resolve(__dirname, "../fixtures/reference.json"), "utf8")) as ReferenceFixtures;
}
