/**
 * The fast Gram matrix (src/core/gram.ts) against exact rational arithmetic: every double is an
 * integer times 2^-1074, so Σ a_i b_i is computed exactly with BigInt here (the oracle is exact
 * arithmetic, not another floating-point code). The check is the module's proven bound:
 * ‖G̃ − G‖_F ≤ bound, on columns of length ≤ 1 with hostile contents — magnitudes spread over
 * hundreds of binades inside one block of rows, zeros, subnormals, exact ties, low parts, row
 * counts that are not a multiple of the block size and an odd number of columns.
 */
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { gramScratch, splitGram } from "../src/core/gram";
import { Workspace } from "../src/core/kernels";
import type { DDMatrix } from "../src/core/refine";

const SHIFT = 1074n;

/** The exact value of a double as an integer multiple of 2^-1074. */
function exact(v: number): bigint {
  if (v === 0) return 0n;
  const buf = new DataView(new ArrayBuffer(8));
  buf.setFloat64(0, v);
  const hi = buf.getUint32(0);
  const lo = buf.getUint32(4);
  const sign = hi >>> 31 ? -1n : 1n;
  const bexp = (hi >>> 20) & 0x7ff;
  let mant = (BigInt(hi & 0xfffff) << 32n) | BigInt(lo);
  if (bexp > 0) mant |= 1n << 52n;
  const e = BigInt(Math.max(bexp, 1) - 1075) + SHIFT; // v = mant · 2^(e − 1074)
  return sign * (mant << e);
}

/** The double-double hi + lo minus the exact `ref` (given in units of 2^-2148), as a double. */
function diff(hi: number, lo: number, ref: bigint): number {
  const d = (exact(hi) + exact(lo)) * (1n << SHIFT) - ref;
  const neg = d < 0n;
  let a = neg ? -d : d;
  let e = -2148;
  while (a > 1n << 60n) {
    a >>= 1n;
    e += 1;
  }
  const half = Math.trunc(e / 2);
  const v = Number(a) * 2 ** half * 2 ** (e - half);
  return neg ? -v : v;
}

function exactGram(A: DDMatrix, nk: number): bigint[] {
  const m = A.m;
  const out: bigint[] = [];
  const col = (j: number, i: number): bigint => exact(A.hi[j * m + i]!) + (A.lo ? exact(A.lo[j * m + i]!) : 0n);
  for (let b = 0; b < nk; b++)
    for (let a = 0; a < nk; a++) {
      let s = 0n;
      for (let i = 0; i < m; i++) s += col(a, i) * col(b, i);
      out.push(s);
    }
  return out;
}

/** Columns with length ≤ 1 built from the generated raw values (hostile magnitudes). */
const matrix = fc
  .tuple(fc.integer({ min: 1, max: 80 }), fc.integer({ min: 1, max: 5 }), fc.boolean(), fc.integer())
  .chain(([m, nk, withLow, seed]) =>
    fc
      .array(
        fc.oneof(
          fc.double({ min: -1, max: 1, noNaN: true }),
          fc.integer({ min: -1070, max: 0 }).map((e) => 2 ** e),
          fc.constantFrom(0, -0, 5e-324, -2.5e-310, 0.5, 1 - 2 ** -53, 2 ** -24 + 2 ** -49),
        ),
        { minLength: m * nk, maxLength: m * nk },
      )
      .map((vals) => ({ m, nk, withLow, seed, vals })),
  );

function build({ m, nk, withLow, vals }: { m: number; nk: number; withLow: boolean; vals: number[] }): DDMatrix {
  const hi = Float64Array.from(vals);
  // scale each column to length ≤ 1 by a power of two (exact)
  for (let j = 0; j < nk; j++) {
    let s = 0;
    for (let i = 0; i < m; i++) s += hi[j * m + i]! ** 2;
    const e = s > 1 ? Math.ceil(Math.log2(Math.sqrt(s))) + 1 : 0;
    for (let i = 0; i < m; i++) hi[j * m + i] = hi[j * m + i]! * 2 ** -e;
  }
  let lo: Float64Array | null = null;
  if (withLow) {
    lo = new Float64Array(m * nk);
    for (let t = 0; t < lo.length; t++) lo[t] = hi[t]! * 2 ** -54 * ((t % 3) - 1); // |lo| ≤ ulp(hi)/2
  }
  return { m, hi, lo };
}

/** ‖G̃ − G‖_F against exact arithmetic stays within the returned bound; returns G̃. */
function expectWithinBound(A: DDMatrix, nk: number, kernel: boolean): ReturnType<typeof splitGram> {
  const cols = Int32Array.from({ length: nk }, (_, i) => i);
  const G = gram(A, cols, nk, kernel);
  const ref = exactGram(A, nk);
  let fro = 0;
  for (let t = 0; t < nk * nk; t++) fro += diff(G.hi[t]!, G.lo[t]!, ref[t]!) ** 2;
  expect(Math.sqrt(fro)).toBeLessThanOrEqual(G.bound);
  return G;
}

/** splitGram in JavaScript, or with the WebAssembly kernel in a fresh workspace. */
function gram(A: DDMatrix, cols: Int32Array, nk: number, kernel: boolean) {
  return splitGram(A, cols, nk, kernel ? Workspace.create(gramScratch(nk)) : null);
}

describe.each([false, true])("fast Gram matrix with a proven error bound (oracle: exact BigInt arithmetic); WebAssembly kernel: %s", (kernel) => {
  it("‖G̃ − G‖_F stays within the bound, and the result is symmetric", () => {
    fc.assert(
      fc.property(matrix, (spec) => {
        const nk = spec.nk;
        const G = expectWithinBound(build(spec), nk, kernel);
        for (let a = 0; a < nk; a++) for (let b = 0; b < nk; b++) expect(G.hi[a * nk + b]).toBe(G.hi[b * nk + a]);
      }),
      { numRuns: 300, seed: 4242 },
    );
  });

  it("stays within the bound on a tall design (10,000 × 5, magnitudes over 40 binades, with low parts)", () => {
    const m = 10_000;
    const nk = 5;
    let seed = 12345;
    const r = (): number => {
      seed = (seed * 16807) % 2147483647;
      return seed / 2147483647 - 0.5;
    };
    const vals = Array.from({ length: m * nk }, () => r() * 2 ** Math.round(r() * 40));
    expectWithinBound(build({ m, nk, withLow: true, vals }), nk, kernel);
  });

  it("sums whose exactness depends on the block size (1,000 rows of 24-bit values at the top of their range)", () => {
    const m = 1000;
    const nk = 3;
    const vals = Array.from({ length: m * nk }, (_, t) => (1 - 2 ** -24) * (t % 2 ? 1 : -1) ** Math.floor(t / m));
    expectWithinBound(build({ m, nk, withLow: false, vals }), nk, kernel);
  });
});
