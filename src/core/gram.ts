/**
 * A fast Gram matrix G = AᵀA with a proven error bound, for refining the covariance of
 * well-conditioned designs (the double-double `ddGram` in refine.ts serves the others).
 *
 * Rows are taken in blocks of B = 32. In each block every column value a is split exactly as
 * a = h + l, where h is a rounded to a multiple of 2^g, with 2^g = 2^-24 · 2^E and 2^E the first
 * power of two above the block's largest |a| in that column. Then
 *
 *     Σ a_i b_i  =  Σ h_i h'_i  +  Σ (a_i l'_i + l_i h'_i)
 *
 * - h and h' are integers of at most 24 bits times 2^g and 2^g'; each product is an integer of at
 *   most 48 bits times 2^(g+g'), so a sum of 32 of them stays below 2^53 of those units and is
 *   computed **exactly** in double arithmetic, in any order (no error-free transformations);
 * - the cross sum is about 2^-24 of the total, so its ordinary rounding (γ_64 relative to
 *   Σ|a l'| + |l h'|) is about 2^-77 of ‖a‖‖b‖.
 *
 * Both block sums are added into double-double accumulators with TwoSum. The result carries an
 * explicit bound on ‖G̃ − G‖_F (Frobenius norm), derived below at `splitGramBound` (it depends
 * only on the sizes, so a caller can decide before computing); the caller uses it
 * only when that bound, multiplied by ‖G⁻¹‖, is a small fraction of a unit in the last place.
 * Per row and pair of columns this costs three multiplications and three additions, against
 * about twenty operations for a TwoProduct/TwoSum pair in `ddGram`.
 */
import { EPS } from "./tolerances";
import { columnView, type DDMatrix } from "./refine";
import type { Workspace } from "./kernels";
import { twoProd, type DD } from "./dd";

/** Rows per block (with 24-bit high parts, 32 products of 48 bits sum exactly below 2^53). */
const B = 32;
/** Bits kept in the high part, relative to the block's largest magnitude. */
const BITS = 24;
/** Smallest grid exponent used: tinier values go wholly into the low part (see the bound). */
const MIN_GRID = -1000;

export interface BoundedGram {
  /** G as a double-double, nk × nk, symmetric, column-major. */
  hi: Float64Array;
  lo: Float64Array;
  /** A bound on ‖G̃ − G‖_F, with G the exact Gram matrix of the columns. */
  bound: number;
}

const f64 = new Float64Array(1);
const u32 = new Uint32Array(f64.buffer);
const LITTLE = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;

/** The grid exponent g for a block column whose largest magnitude is `max` (≥ 0). */
function gridExponent(max: number): number {
  f64[0] = max;
  const bexp = (u32[LITTLE ? 1 : 0]! >>> 20) & 0x7ff; // biased exponent; 0 for 0 and subnormals
  // max < 2^E with E = bexp − 1022 (for normal max); subnormal or zero: max < 2^-1022.
  const E = bexp === 0 ? -1022 : bexp - 1022;
  return Math.max(E - BITS, MIN_GRID);
}

/** Rows per panel copied into a workspace for the WebAssembly kernel (a multiple of B). */
const PANEL = 1024;

/** Doubles of workspace that splitGram needs for nk columns. */
export function gramScratch(nk: number): number {
  return 2 * nk * PANEL + 4 * B * nk + 4 * nk * nk + nk + 32;
}

/**
 * The Gram matrix of columns `cols[0..nk)` of A (A = hi + lo, each column of Euclidean length at
 * most 1, as the engine's equilibrated designs are), with its error bound. With a workspace
 * (kernels.ts, `gramScratch(nk)` doubles free) the blocks run as a WebAssembly kernel on panels
 * of rows copied into it; the exact sums are the same and the cross sums stay within the bound.
 */
export function splitGram(A: DDMatrix, cols: Int32Array, nk: number, ws: Workspace | null = null): BoundedGram {
  if (ws) return splitGramKernel(A, cols, nk, ws);
  const m = A.m;
  const { lo } = A;
  // Accumulators: exact-part sums S1 and cross sums S2, each a double-double.
  const s1h = new Float64Array(nk * nk);
  const s1l = new Float64Array(nk * nk);
  const s2h = new Float64Array(nk * nk);
  const s2l = new Float64Array(nk * nk);
  const v = new Float64Array(B * nk);
  const h = new Float64Array(B * nk);
  const l = new Float64Array(B * nk);
  const w = lo ? new Float64Array(B * nk) : null; // low parts of A for this block
  const views = Array.from(cols.subarray(0, nk), (c) => columnView(A, c));
  for (let i0 = 0; i0 < m; i0 += B) {
    const nb = Math.min(B, m - i0);
    for (let k = 0; k < nk; k++) {
      const { data, off, scale } = views[k]!;
      const o = k * B;
      const src = off + i0;
      let max = 0;
      for (let i = 0; i < nb; i++) {
        const a = data[src + i]! * scale;
        v[o + i] = a;
        max = Math.max(max, Math.abs(a));
      }
      // σ = 1.5·2^(g+52): a + σ rounds a to a multiple of 2^g (|a| < 2^(g+24) ≪ 2^(g+51)).
      const g = gridExponent(max);
      const sigma = 1.5 * 2 ** (g + 52);
      for (let i = 0; i < nb; i++) {
        const a = v[o + i]!;
        const hi = a + sigma - sigma;
        h[o + i] = hi;
        l[o + i] = a - hi; // exact: |a − hi| ≤ 2^(g−1) and both are multiples of ulp(a) or 2^g
      }
      for (let i = nb; i < B; i++) v[o + i] = h[o + i] = l[o + i] = 0;
      if (w) {
        const lo0 = cols[k]! * m + i0;
        for (let i = 0; i < nb; i++) w[o + i] = lo![lo0 + i]!;
        for (let i = nb; i < B; i++) w[o + i] = 0;
      }
    }
    // 2 × 2 tiles of pairs (a, a+1) × (b, b+1) with a ≤ b: four columns loaded per row serve four
    // pairs. A tile on the diagonal also computes (a+1, a), the mirror of (a, a+1); it is stored in
    // the lower triangle and ignored.
    for (let b = 0; b < nk; b += 2) {
      const b1 = Math.min(b + 1, nk - 1); // an odd last column pairs with itself (harmlessly)
      for (let a = 0; a <= b; a += 2) {
        const a1 = Math.min(a + 1, nk - 1);
        const oa = a * B;
        const oa1 = a1 * B;
        const ob = b * B;
        const ob1 = b1 * B;
        let e00 = 0, e01 = 0, e10 = 0, e11 = 0; // exact sums Σ h h'
        let c00 = 0, c01 = 0, c10 = 0, c11 = 0; // cross sums Σ a l' + l h'
        for (let i = 0; i < B; i++) {
          const va = v[oa + i]!, ha = h[oa + i]!, la = l[oa + i]!;
          const va1 = v[oa1 + i]!, ha1 = h[oa1 + i]!, la1 = l[oa1 + i]!;
          const hb = h[ob + i]!, lb = l[ob + i]!;
          const hb1 = h[ob1 + i]!, lb1 = l[ob1 + i]!;
          e00 += ha * hb;
          e01 += ha * hb1;
          e10 += ha1 * hb;
          e11 += ha1 * hb1;
          c00 += va * lb + la * hb;
          c01 += va * lb1 + la * hb1;
          c10 += va1 * lb + la1 * hb;
          c11 += va1 * lb1 + la1 * hb1;
        }
        if (w) {
          // Products with the low parts of A are 2^-53 smaller still: ordinary arithmetic.
          for (let i = 0; i < B; i++) {
            c00 += v[oa + i]! * w[ob + i]! + w[oa + i]! * v[ob + i]!;
            c01 += v[oa + i]! * w[ob1 + i]! + w[oa + i]! * v[ob1 + i]!;
            c10 += v[oa1 + i]! * w[ob + i]! + w[oa1 + i]! * v[ob + i]!;
            c11 += v[oa1 + i]! * w[ob1 + i]! + w[oa1 + i]! * v[ob1 + i]!;
          }
        }
        accumulate(s1h, s1l, s2h, s2l, b * nk + a, e00, c00);
        if (b1 !== b) accumulate(s1h, s1l, s2h, s2l, b1 * nk + a, e01, c01);
        if (a1 !== a) accumulate(s1h, s1l, s2h, s2l, b * nk + a1, e10, c10);
        if (a1 !== a && b1 !== b) accumulate(s1h, s1l, s2h, s2l, b1 * nk + a1, e11, c11);
      }
    }
  }
  return combine(s1h, s1l, s2h, s2l, nk, m, !!lo);
}

/** splitGram with the blocks in the WebAssembly kernel `gram`. */
function splitGramKernel(A: DDMatrix, cols: Int32Array, nk: number, ws: Workspace): BoundedGram {
  const m = A.m;
  const { lo } = A;
  const mark = ws.mark();
  const panel = ws.alloc(nk * PANEL);
  const lop = lo ? ws.alloc(nk * PANEL) : null;
  const scales = ws.alloc(nk);
  const v = ws.alloc(B * nk);
  const h = ws.alloc(B * nk);
  const l = ws.alloc(B * nk);
  const w = ws.alloc(B * nk);
  const s1h = ws.alloc(nk * nk);
  const s1l = ws.alloc(nk * nk);
  const s2h = ws.alloc(nk * nk);
  const s2l = ws.alloc(nk * nk);
  for (const a of [s1h, s1l, s2h, s2l]) a.fill(0);
  const views = Array.from(cols.subarray(0, nk), (c) => columnView(A, c));
  for (let i0 = 0; i0 < m; i0 += PANEL) {
    const rows = Math.min(PANEL, m - i0);
    for (let k = 0; k < nk; k++) {
      const { data, off, scale } = views[k]!;
      panel.set(data.subarray(off + i0, off + i0 + rows), k * PANEL);
      scales[k] = scale;
      if (lop) lop.set(lo!.subarray(cols[k]! * m + i0, cols[k]! * m + i0 + rows), k * PANEL);
    }
    ws.k.gram(panel.byteOffset, lop ? lop.byteOffset : 0, nk, rows, PANEL, scales.byteOffset, v.byteOffset, h.byteOffset, l.byteOffset, w.byteOffset, s1h.byteOffset, s1l.byteOffset, s2h.byteOffset, s2l.byteOffset);
  }
  const out = combine(s1h, s1l, s2h, s2l, nk, m, !!lo);
  ws.release(mark);
  return out;
}

/** G = S1 + S2 as a double-double, mirrored into both triangles, with its bound. */
function combine(s1h: Float64Array, s1l: Float64Array, s2h: Float64Array, s2l: Float64Array, nk: number, m: number, withLow: boolean): BoundedGram {
  const gh = new Float64Array(nk * nk);
  const gl = new Float64Array(nk * nk);
  for (let b = 0; b < nk; b++)
    for (let a = 0; a <= b; a++) {
      const at = b * nk + a;
      const s = s1h[at]! + s2h[at]!;
      const bb = s - s1h[at]!;
      const e = s1h[at]! - (s - bb) + (s2h[at]! - bb) + s1l[at]! + s2l[at]!;
      const x = s + e;
      const y = e - (x - s);
      gh[at] = gh[a * nk + b] = x;
      gl[at] = gl[a * nk + b] = y;
    }
  return { hi: gh, lo: gl, bound: splitGramBound(m, nk, withLow) };
}

/** (s1h, s1l) += e exactly (TwoSum) and (s2h, s2l) += c (TwoSum), at entry `at`. */
function accumulate(s1h: Float64Array, s1l: Float64Array, s2h: Float64Array, s2l: Float64Array, at: number, e: number, c: number): void {
  let s = s1h[at]!;
  let t = s + e;
  let bb = t - s;
  s1l[at]! += s - (t - bb) + (e - bb);
  s1h[at] = t;
  s = s2h[at]!;
  t = s + c;
  bb = t - s;
  s2l[at]! += s - (t - bb) + (c - bb);
  s2h[at] = t;
}

/**
 * The error bound. For one pair of columns a, b (lengths ≤ 1) and one block:
 * - the exact sum contributes nothing (its products and partial sums are integers below 2^53
 *   units of 2^(g+g'); if those units fall below the smallest double, each product loses at most
 *   2^-1074, at most B·2^-1074 per block, covered by the last term below);
 * - the cross sum has 2B terms (4B with low parts), so it rounds by at most γ_n·Σ(|a l'| + |l h'|)
 *   with n = 2B + 1 (4B + 1): the WebAssembly kernel sums two lanes and then joins them.
 *   |l| ≤ 2^(g−1) ≤ 2^-24·max|a| (a clamped grid only makes |l| ≤ 2^-1001, covered by the last
 *   term) and |h'| ≤ (1 + 2^-24)·max|b|, so by Cauchy–Schwarz (max|b| ≤ ‖b_blk‖, Σ|a| ≤ √B‖a_blk‖)
 *   Σ(|a l'| + |l h'|) ≤ 2^-23·(1 + 2^-23)·√B·‖a_blk‖‖b_blk‖;
 * - summed over blocks, Σ‖a_blk‖‖b_blk‖ ≤ ‖a‖‖b‖ ≤ 1 (Cauchy–Schwarz again);
 * - the low parts of A (|lo| ≤ 2^-53·|hi|) add 2B rounded terms below 2^-52·Σ|a||b| and leave out
 *   Σ lo·lo' ≤ 2^-106: together below 2ε²·‖a‖‖b‖;
 * - the double-double accumulations: each of the N = ⌈m/B⌉ TwoSums into an accumulator is exact,
 *   its error term (≤ u·‖a‖‖b‖, u = ε/2, partial sums being bounded by Σ|h h'| or Σ|a l'| + |l h'|)
 *   is added in ordinary arithmetic to a low part of size ≤ N·u, which rounds by at most N·u²
 *   each time: ≤ (N² + N)·u² per accumulator, two accumulators, plus the final combination.
 * The Frobenius norm over nk² pairs with per-pair bound c‖a‖‖b‖ is ≤ c·Σ‖a‖² ≤ c·nk.
 */
export function splitGramBound(m: number, nk: number, withLow: boolean): number {
  const u = EPS / 2;
  // Terms per cross sum: 2 per row (4 with low parts), summed in one chain (JavaScript) or two
  // lanes then joined (WebAssembly): at most 2B (+1 for the join), or 4B + 1.
  const n = withLow ? 4 * B + 1 : 2 * B + 1;
  const gamma = (n * u) / (1 - n * u);
  const cross = gamma * 2 ** -23 * (1 + 2 ** -23) * Math.sqrt(B);
  const low = withLow ? 2 * EPS * EPS : 0;
  const N = Math.ceil(m / B);
  const accumulation = 2 * (N * N + N + 4) * u * u;
  const tiny = (m + B) * 2 ** -990; // products below the smallest double, clamped grids
  return nk * (cross + low + accumulation) + nk * nk * tiny;
}

const scratch: DD = { hi: 0, lo: 0 };

/**
 * out[i] = (rHi + rLo)[i] − Σ_k G(i, k)·(xh + xl)[k], i < p, for a double-double G (p × p, column-
 * major) and x: every product G.hi·xh error-free (TwoProduct) and summed with TwoSum, the terms
 * with G.lo and xl (2^-53 smaller) in working precision. rLo and xl may be null (zero).
 */
export function gramResidual(G: { hi: Float64Array; lo: Float64Array }, p: number, rHi: ArrayLike<number>, rLo: ArrayLike<number> | null, xh: ArrayLike<number>, xl: ArrayLike<number> | null, out: Float64Array): void {
  for (let i = 0; i < p; i++) {
    let s = rHi[i]!;
    let e = rLo ? rLo[i]! : 0;
    for (let k = 0; k < p; k++) {
      const g = G.hi[k * p + i]!;
      const xk = xh[k]!;
      twoProd(g, -xk, scratch);
      const sn = s + scratch.hi;
      const bb = sn - s;
      e += s - (sn - bb) + (scratch.hi - bb) + scratch.lo - G.lo[k * p + i]! * xk - (xl ? g * xl[k]! : 0);
      s = sn;
    }
    out[i] = s + e;
  }
}
