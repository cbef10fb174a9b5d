/**
 * Reliability: every LSQ function, called through the host-faithful path (dist/functions.js in
 * node:vm, see helpers/host.ts), survives generated hostile input.
 *
 * Invariants for every call: it returns a 2-D array of the documented shape or throws one
 * CustomFunctions.Error with a non-empty message; nothing else is thrown; no numeric cell is NaN
 * or infinite; the same inputs give bit-identical outputs (a cold call, which misses the cache, and
 * a warm one, which hits it); the input arrays are not mutated; changing one input cell gives the
 * same result as a fresh runtime that never saw the original input (no stale cache entry).
 *
 * About 10,000 calls in `npm test` and over 100,000 in `.ci/run` (COLSPACE_FUZZ_RUNS=26000); the
 * count and the seed are printed. The seed is fixed; set COLSPACE_FUZZ_SEED=<integer> (or "random")
 * and COLSPACE_FUZZ_RUNS to explore.
 */
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { HostError, loadHost, type Host } from "./helpers/host";

const SEED_ENV = process.env.COLSPACE_FUZZ_SEED;
const SEED = SEED_ENV === "random" ? Math.floor(Math.random() * 2 ** 31) : SEED_ENV ? Number(SEED_ENV) : 20261201;
/** Cases per run: about 2,600 (some 10,000 calls) in `npm test`; .ci/run sets COLSPACE_FUZZ_RUNS for 100,000 or more. */
const RUNS = Number(process.env.COLSPACE_FUZZ_RUNS ?? 2600);
/** Each case makes three or four calls. */
const MIN_CALLS = 3 * RUNS;

const ERROR_VALUES = [new HostError("#N/A"), new HostError("#VALUE!"), new HostError("#DIV/0!")];
const EXTREMES = [NaN, Infinity, -Infinity, 1e308, -1e308, 5e-324, -0, 0, 1e-300, 1e300];
const MISSING: unknown[] = ["", null, "n/a", "TRUE", "  ", "<b>x</b>", true, false, ...ERROR_VALUES];

/** Cells: `hostile` mixes in extremes, text, booleans and error values much more often. */
function cellOf(hostile: boolean): fc.Arbitrary<unknown> {
  return fc.oneof(
    { weight: 40, arbitrary: fc.double({ min: -1e3, max: 1e3, noNaN: true }) },
    { weight: 10, arbitrary: fc.integer({ min: -20, max: 20 }) },
    { weight: hostile ? 6 : 1, arbitrary: fc.constantFrom<unknown>(...MISSING) },
    { weight: hostile ? 3 : 0, arbitrary: fc.constantFrom(...EXTREMES) },
    { weight: hostile ? 2 : 0, arbitrary: fc.double() },
  );
}

/** A range: mostly rectangular, sometimes ragged, empty, or 1×1; columns may be rescaled hugely. */
function range(rows: number, cols: number, hostile: boolean): fc.Arbitrary<unknown[][]> {
  const cell = cellOf(hostile);
  const rect = fc
    .tuple(fc.array(fc.array(cell, { minLength: cols, maxLength: cols }), { minLength: rows, maxLength: rows }), fc.array(fc.constantFrom(1, 1, 1, 1, 1, 2 ** 500, 2 ** -500, 1e200, 1e-200, 1e6), { minLength: cols, maxLength: cols }))
    .map(([r, scales]) => r.map((row) => row.map((v, j) => (typeof v === "number" ? v * scales[j]! : v))));
  return fc.oneof(
    { weight: hostile ? 16 : 80, arbitrary: rect },
    { weight: 1, arbitrary: fc.constantFrom<unknown[][]>([], [[]]) },
    { weight: 1, arbitrary: fc.array(fc.array(cell, { maxLength: cols + 1 }), { minLength: 1, maxLength: rows + 1 }) },
    { weight: 1, arbitrary: cell.map((c) => [[c]]) },
  );
}

function optionalOf(hostile: boolean, valid: readonly unknown[]): fc.Arbitrary<unknown> {
  return fc.oneof(
    { weight: 12, arbitrary: fc.constant(null) },
    { weight: 6, arbitrary: fc.constantFrom<unknown>(...valid) },
    { weight: hostile ? 4 : 0, arbitrary: fc.constantFrom<unknown>(true, false, 0, 1, 2, 3, 2.5, 1e9, -1, 0.5, 0.95, 0.999, 20, 21, "foo", "confidence", "prediction", "TRUE", "", NaN, Infinity) },
    { weight: hostile ? 1 : 0, arbitrary: fc.constantFrom<unknown>([[2]], [[true]], [["prediction"]], [[1, 2]], ERROR_VALUES[0]) },
  );
}

const IDS = ["COEF", "FITTED", "RESID", "COV", "PARAMS", "STATS", "PREDICT", "INFLUENCE", "CHECK", "INVERSE", "LIMITS", "GOF", "LINEXY"] as const;

const call = fc
  .tuple(
    fc.oneof({ weight: 30, arbitrary: fc.integer({ min: 1, max: 60 }) }, { weight: 1, arbitrary: fc.constant(0) }),
    fc.oneof({ weight: 30, arbitrary: fc.integer({ min: 1, max: 8 }) }, { weight: 1, arbitrary: fc.constant(0) }),
    fc.constantFrom(...IDS),
    fc.boolean(),
  )
  .chain(([m, k, id, hostile]) =>
    fc.record({
      id: fc.constant(id),
      y: range(m, 1, hostile),
      x: range(m, k, hostile),
      newx: range(3, k, hostile),
      intercept: optionalOf(hostile, [true, false, 1, 0, "FALSE"]),
      weights: fc.oneof(
        { weight: 4, arbitrary: fc.constant(null) },
        { weight: 2, arbitrary: range(m, 1, hostile).map((r) => r.map((row) => row.map((v) => (typeof v === "number" ? Math.abs(v) : v)))) },
        { weight: hostile ? 1 : 0, arbitrary: range(m, 1, hostile) },
      ),
      degree: k === 1 ? optionalOf(hostile, [1, 2, 3, 5]) : optionalOf(hostile, [1]),
      interval: optionalOf(hostile, ["confidence", "prediction", "Prediction "]),
      level: optionalOf(hostile, [0.9, 0.99, 0.5]),
      newy: range(3, 1, hostile),
      replicates: optionalOf(hostile, [1, 2, 5]),
      ureading: optionalOf(hostile, [0.1, 1]),
      headers: optionalOf(hostile, [true, false]),
      weighting: optionalOf(hostile, ["relative", "uncertainty"]),
      method: optionalOf(hostile, ["calibration", "ich"]),
      alpha: optionalOf(hostile, [0.01, 0.05]),
      uy: fc.oneof(range(m, 1, hostile).map((r) => r.map((row) => row.map((v) => (typeof v === "number" ? Math.abs(v) : v)))), cellOf(hostile).map((c) => [[typeof c === "number" ? Math.abs(c) : c]])),
      ux: fc.oneof(range(m, 1, hostile).map((r) => r.map((row) => row.map((v) => (typeof v === "number" ? Math.abs(v) / 10 : v)))), fc.constantFrom<unknown[][]>([[0]], [[0.1]], [[1]])),
      correlation: fc.oneof({ weight: 4, arbitrary: fc.constant<unknown>(null) }, { weight: 1, arbitrary: fc.constantFrom<unknown>([[0.5]], [[-0.9]], [[2]], "x") }),
      poke: fc.nat(),
    }),
  );

type Args = { id: string; y: unknown[][]; x: unknown[][]; newx: unknown[][]; newy: unknown[][]; intercept: unknown; weights: unknown; degree: unknown; interval: unknown; level: unknown; replicates: unknown; ureading: unknown; headers: unknown; weighting: unknown; method: unknown; alpha: unknown; uy: unknown; ux: unknown; correlation: unknown; poke: number };

function clone(v: unknown): unknown {
  if (Array.isArray(v)) return v.map(clone);
  return v; // numbers, strings, booleans, null and error objects (never mutated: checked by identity)
}

function same(a: unknown, b: unknown): boolean {
  if (Array.isArray(a) && Array.isArray(b)) return a.length === b.length && a.every((v, i) => same(v, b[i]));
  if (a instanceof HostError && b instanceof HostError) return a.code === b.code && a.message === b.message;
  return Object.is(a, b);
}

function sameOutcome(a: { value?: unknown; error?: unknown }, b: { value?: unknown; error?: unknown }): boolean {
  return same(a.value, b.value) && same(a.error, b.error);
}

function argsOf(a: Args): Record<string, unknown> {
  return { y: a.y, x: a.x, newx: a.newx, newy: a.newy, intercept: a.intercept, weights: a.weights, degree: a.degree, interval: a.interval, level: a.level, replicates: a.replicates, ureading: a.ureading, headers: a.headers, weighting: a.weighting, method: a.method, alpha: a.alpha, uy: a.uy, ux: a.ux, correlation: a.correlation };
}

let calls = 0;
const tally = new Map<string, number>();
function run(host: Host, a: Args): { value?: unknown[][]; error?: HostError } {
  calls++;
  try {
    const value = host.call(a.id, argsOf(a)) as unknown[][];
    tally.set("result", (tally.get("result") ?? 0) + 1);
    return { value };
  } catch (e) {
    if (e instanceof HostError) {
      tally.set(e.code, (tally.get(e.code) ?? 0) + 1);
      if (process.env.COLSPACE_FUZZ_MESSAGES) tally.set((e.message ?? "").replace(/[0-9]+/g, "#").slice(0, 45), (tally.get((e.message ?? "").replace(/[0-9]+/g, "#").slice(0, 45)) ?? 0) + 1);
      return { error: e };
    }
    throw new Error(`${a.id} threw something that is not a spreadsheet error: ${String(e)}`);
  }
}

function checkShape(a: Args, value: unknown[][]): void {
  expect(Array.isArray(value) && value.length > 0).toBe(true);
  const w = value[0]!.length;
  for (const row of value) {
    expect(Array.isArray(row)).toBe(true);
    expect(row.length).toBe(w);
    for (const c of row) {
      if (typeof c === "number") expect(Number.isFinite(c), `${a.id} produced ${c}`).toBe(true);
      else if (c instanceof HostError) expect((c.message ?? "").length).toBeGreaterThan(0);
      else expect(typeof c).toBe("string");
    }
  }
  const h = value.length > 0 && typeof value[0]![0] === "string" && a.id !== "STATS" && a.id !== "CHECK" && a.id !== "LIMITS" && a.id !== "GOF" && a.id !== "LINEXY" ? 1 : 0; // a header row or term column
  const widths: Record<string, number[]> = { COEF: [1, 2], FITTED: [1, value.length === 1 ? w : 1], RESID: [1, value.length === 1 ? w : 1], COV: [value.length, value.length - h, value.length], PARAMS: [6, 7], STATS: [2], PREDICT: [1, 3, w], INFLUENCE: [4], CHECK: [1], INVERSE: [4], LIMITS: [2], GOF: [2], LINEXY: [5] };
  expect(widths[a.id], `${a.id} width ${w}`).toContain(w);
  if (a.id === "LIMITS") expect(value.length).toBe(9);
  if (a.id === "GOF") expect(value.length).toBe(13);
  if (a.id === "LINEXY") expect(value.length).toBe(10);
  if (a.id === "STATS") expect(value.length).toBe(15);
}

/** Change one numeric cell of y or x (or turn it into text) in a copy. */
function poke(a: Args): Args | null {
  const b = { ...a, y: clone(a.y), x: clone(a.x) } as Args;
  const targets: [unknown[][], number, number][] = [];
  for (const r of [b.y, b.x]) if (Array.isArray(r)) r.forEach((row, i) => Array.isArray(row) && row.forEach((_, j) => targets.push([r, i, j])));
  if (targets.length === 0) return null;
  const [r, i, j] = targets[a.poke % targets.length]!;
  const v = r[i]![j];
  r[i]![j] = typeof v === "number" && Number.isFinite(v) ? (v === 0 ? 1 : v * (1 + 2 ** -40)) : 3.25;
  return b;
}

describe(`fuzz: hostile input through the host path (seed ${SEED})`, () => {
  it(`keeps every invariant over at least ${MIN_CALLS} calls`, () => {
    const hostA = loadHost();
    const hostB = loadHost();
    fc.assert(
      fc.property(call, (a0) => {
        const a = a0 as Args;
        const before = clone(Object.values(argsOf(a)));
        const cold = run(hostA, a);
        expect(same(Object.values(argsOf(a)), before), "inputs were mutated").toBe(true);
        if (cold.value) checkShape(a, cold.value);
        else expect((cold.error!.message ?? "").length, `${a.id} error without message`).toBeGreaterThan(0);
        const warm = run(hostA, a);
        expect(sameOutcome(warm, cold), "cold and warm calls differ").toBe(true);
        const b = poke(a);
        if (b) {
          const viaWarmCache = run(hostA, b);
          const fresh = run(hostB, b);
          expect(sameOutcome(viaWarmCache, fresh), "stale result after changing one cell").toBe(true);
        }
      }),
      { seed: SEED, numRuns: RUNS },
    );
    console.log(`fuzz: ${calls} generated calls (seed ${SEED}, ${RUNS} cases); outcomes ${JSON.stringify(Object.fromEntries(tally))}`);
    expect(calls).toBeGreaterThanOrEqual(MIN_CALLS);
  }, 600_000);
});
