/**
 * Iterative refinement of least-squares solutions on the augmented system (Björck):
 *
 *     [ I   A ] [ r ]   [ b ]
 *     [ Aᵀ  0 ] [ x ] = [ c ]
 *
 * where A = the first `nk` kept columns of the equilibrated design, given exactly as a
 * double-double matrix Ahi + Alo (Alo may be null when the design is exactly representable).
 * With c = 0 this is the least-squares problem min ‖b − A x‖ (r = b − A x); with b = 0 and
 * c = e_j it gives x = −(AᵀA)⁻¹ e_j, the j-th column of the (negated) unscaled covariance.
 *
 * Each step computes the residuals of both block rows with error-free transformations
 * (TwoProduct by Dekker splitting, TwoSum; compensated in the style of Ogita–Rump–Oishi's
 * Dot2, i.e. as if in twice the working precision), then solves for the corrections with the
 * existing QR factor (the stopping rule is described at the end of the loop):
 *
 *     f = b − r − A x,  g = c − Aᵀ r
 *     h = R⁻ᵀ g,  d = Qᵀ f,  δx = R⁻¹ (d₁ − h),  δr = Q [h; d₂]
 *
 * Starting from r = 0, x = 0 the first step is the ordinary QR solution. Each right-hand side
 * stops by the one stopping rule of the engine (`StopRule` below) with the level ε‖x‖, or after
 * `maxSteps` (12 by default; the accuracy benchmark asks for 1 to show the unrefined solution).
 */
import type { HouseholderQR } from "./qr";
import { EPS } from "./tolerances";
import { SPLITTER, type DD } from "./dd";

/**
 * A double-double design with m rows. Column c is hi[c·m + i] (+ lo[c·m + i]); or, when `cols` is
 * given, cols[c].data[cols[c].off + i] · cols[c].scale, a view into other storage (the user's x)
 * multiplied by a power of two, which is exact. Views are used only for exact designs (lo = null).
 */
export interface DDMatrix {
  readonly m: number;
  readonly hi: Float64Array;
  readonly lo: Float64Array | null;
  readonly cols?: readonly ColumnView[];
}

export interface ColumnView {
  readonly data: Float64Array;
  readonly off: number;
  /** A power of two. */
  readonly scale: number;
}

/** Where column `col` of A lives. */
export function columnView(A: DDMatrix, col: number): ColumnView {
  return A.cols ? A.cols[col]! : { data: A.hi, off: col * A.m, scale: 1 };
}

/** Column `col` of A (high parts) as a plain array: a subarray, or a scaled copy of a view. */
export function columnOf(A: DDMatrix, col: number): Float64Array {
  const { data, off, scale } = columnView(A, col);
  if (scale === 1) return data.subarray(off, off + A.m);
  const out = new Float64Array(A.m);
  for (let i = 0; i < A.m; i++) out[i] = data[off + i]! * scale;
  return out;
}

export interface RefineResult {
  /** Solutions, nk × nr column-major. */
  x: Float64Array;
  /** Residual blocks r, m × nr column-major. */
  r: Float64Array;
  /** Refinement steps taken (including the first solve), per right-hand side. */
  steps: Int32Array;
  /** Whether each right-hand side met the ε‖x‖ stopping test (false: stagnated or hit the limit). */
  converged: boolean[];
}

/**
 * Largest observed contraction (correction / previous correction) for which a refinement may stop
 * on the predicted next correction instead of a measured one: 2^-26 ≈ √ε.
 */
export const RATE = 2 ** -26;

/** What the stopping rule says about one correction. */
export type Verdict = "reject" | "converged" | "stalled" | "continue";

/**
 * The one stopping rule of every refinement in the engine (coefficients and covariance on the
 * augmented system, the fast path's parameter-space iteration, the Gram-based covariance):
 *
 * - a correction that did not shrink (from the second on) is rejected: not applied, stop;
 * - converged when the correction is at most `level` (the size below which it no longer changes
 *   the result, e.g. ε‖x‖), or when the next one, predicted from the observed rate as nd²/prev,
 *   is at most half of it — trusted only when the rate was measured between two corrections
 *   (from the third correction on: the first ratio compares a correction with the solution
 *   itself) and is fast (≤ RATE);
 * - stalled (stop, not converged) when a correction shrank by less than half;
 * - otherwise continue.
 *
 * Every verdict but "reject" comes after the caller has applied the correction.
 */
export class StopRule {
  private prev = Infinity;
  private count = 0;
  judge(nd: number, level: number): Verdict {
    const step = this.count++;
    if (step > 0 && !(nd < this.prev)) return "reject";
    if (nd <= level || (step > 1 && nd <= RATE * this.prev && (nd * nd) / this.prev <= 0.5 * level)) return "converged";
    if (step > 0 && nd > 0.5 * this.prev) return "stalled";
    this.prev = nd;
    return "continue";
  }
}

/** Work vectors of m doubles that refineAugmented takes from a workspace (f, comp, two halves, two slots). */
export const REFINE_SCRATCH = 6;

export interface RefineOptions {
  maxSteps?: number;
}

/**
 * Solve the augmented system for nr right-hand sides and refine.
 * @param qr - factor of the design (its first nk kept columns are used)
 * @param A - the exact design (dd), same column numbering as the factor
 * @param nk - number of leading kept columns to use (≤ qr.rank)
 * @param nr - number of right-hand sides
 * @param bHi - first block, m × nr (null for zero)
 * @param bLo - low parts of the first block (null for exact)
 * @param c - second block, nk × nr (null for zero)
 */
export function refineAugmented(
  qr: HouseholderQR,
  A: DDMatrix,
  nk: number,
  nr: number,
  bHi: Float64Array | null,
  bLo: Float64Array | null,
  c: Float64Array | null,
  opts: RefineOptions = {},
): RefineResult {
  const m = qr.m;
  const maxSteps = opts.maxSteps ?? 12;
  const x = new Float64Array(nk * nr);
  const r = new Float64Array(m * nr);
  const steps = new Int32Array(nr);
  const converged: boolean[] = new Array<boolean>(nr).fill(false);
  // Work vectors: in the factor's WebAssembly workspace when it has one (the compensated pass and
  // the block reflectors then run as kernels), else ordinary arrays.
  const ws = qr.ws;
  const mark = ws ? ws.mark() : 0;
  const vec = (): Float64Array => (ws ? ws.alloc(m) : new Float64Array(m));
  const f = vec();
  const comp = vec();
  const rh = vec();
  const rl = vec();
  const colSlot = ws ? ws.alloc(m) : null;
  const loSlot = ws && A.lo ? ws.alloc(m) : null;
  const g = new Float64Array(nk);
  const dx = new Float64Array(nk);
  const cols = qr.kept.subarray(0, nk);
  for (let t = 0; t < nr; t++) {
    const xo = t * nk;
    const ro = t * m;
    const rule = new StopRule();
    for (let step = 0; step < maxSteps; step++) {
      if (step === 0) {
        // r = 0, x = 0: the residuals are the right-hand sides themselves.
        for (let i = 0; i < m; i++) f[i] = bHi ? bHi[ro + i]! + (bLo ? bLo[ro + i]! : 0) : 0;
        for (let k = 0; k < nk; k++) g[k] = c ? c[t * nk + k]! : 0;
      } else {
        // f = b − r − A x and g = c − Aᵀ r, both compensated, in one pass over A.
        for (let i = 0; i < m; i++) {
          const bh = bHi ? bHi[ro + i]! : 0;
          const ri = r[ro + i]!;
          const s = bh - ri;
          const bb = s - bh;
          f[i] = s;
          comp[i] = bh - (s - bb) + (-ri - bb) + (bLo ? bLo[ro + i]! : 0);
        }
        // Split −r once per step (Dekker halves), shared by every column's dot product.
        for (let i = 0; i < m; i++) {
          const b = -r[ro + i]!;
          const u = SPLITTER * b;
          const bh = u - (u - b);
          rh[i] = bh;
          rl[i] = b - bh;
        }
        for (let k = 0; k < nk; k++) {
          const c0 = c ? c[t * nk + k]! : 0;
          if (ws && colSlot) {
            const cv = columnView(A, cols[k]!);
            colSlot.set(cv.data.subarray(cv.off, cv.off + m));
            if (loSlot) loSlot.set(A.lo!.subarray(cols[k]! * m, (cols[k]! + 1) * m));
            g[k] = ws.k.fused(colSlot.byteOffset, loSlot ? loSlot.byteOffset : 0, cv.scale, -x[xo + k]!, f.byteOffset, comp.byteOffset, rh.byteOffset, rl.byteOffset, m, c0);
          } else g[k] = fusedColumnPass(A, cols[k]!, -x[xo + k]!, f, comp, c0, rh, rl, m);
        }
        for (let i = 0; i < m; i++) f[i] = f[i]! + comp[i]!;
      }
      // corrections
      qr.solveRt(nk, g);
      qr.applyQt(nk, f);
      for (let k = 0; k < nk; k++) dx[k] = f[k]! - g[k]!;
      qr.solveR(nk, dx);
      for (let k = 0; k < nk; k++) f[k] = g[k]!;
      qr.applyQ(nk, f); // δr
      let nd = 0;
      let nx = 0;
      for (let k = 0; k < nk; k++) {
        nd = Math.max(nd, Math.abs(dx[k]!));
        nx = Math.max(nx, Math.abs(x[xo + k]! + dx[k]!));
      }
      const verdict = rule.judge(nd, EPS * nx);
      if (verdict === "reject") break; // stagnated or diverging: keep the last iterate
      for (let k = 0; k < nk; k++) x[xo + k]! += dx[k]!;
      for (let i = 0; i < m; i++) r[ro + i]! += f[i]!;
      steps[t] = step + 1;
      if (verdict !== "continue") {
        converged[t] = verdict === "converged";
        break;
      }
    }
  }
  if (ws) ws.release(mark);
  return { x, r, steps, converged };
}

/**
 * One pass over column `col` of A doing both halves of a refinement residual:
 * (s, comp) += α · A(:, col) as in residualUpdate, and returns c0 + A(:, col)ᵀ v, compensated
 * (Dot2 with the low part of A folded in), where v is given already split into Dekker halves
 * vh + vl (it is −r, the same for every column). Each entry of A is split once for both products.
 */
export function fusedColumnPass(A: DDMatrix, col: number, alpha: number, s: Float64Array, comp: Float64Array, c0: number, vh: Float64Array, vl: Float64Array, m: number): number {
  const { data: hi, off, scale } = columnView(A, col);
  const lo = A.lo;
  const loOff = col * m;
  let t = SPLITTER * alpha;
  const xh = t - (t - alpha);
  const xl = alpha - xh;
  let ds = c0;
  let de = 0;
  for (let i = 0; i < m; i++) {
    const a = hi[off + i]! * scale;
    t = SPLITTER * a;
    const ah = t - (t - a);
    const al = a - ah;
    // (s, comp) += a·α
    const p = a * alpha;
    const si = s[i]!;
    const sn = si + p;
    const bb = sn - si;
    s[i] = sn;
    comp[i]! += si - (sn - bb) + (p - bb) + (ah * xh - p + ah * xl + al * xh + al * xl);
    // ds += a·v_i
    const bh = vh[i]!;
    const bl = vl[i]!;
    const q = a * (bh + bl);
    const dn = ds + q;
    const cc = dn - ds;
    de += ds - (dn - cc) + (q - cc) + (ah * bh - q + ah * bl + al * bh + al * bl);
    ds = dn;
  }
  if (lo) {
    // The low parts of A contribute products that are already 2^-53 smaller: working precision.
    for (let i = 0; i < m; i++) {
      const l = lo[loOff + i]!;
      comp[i]! += l * alpha;
      de += l * (vh[i]! + vl[i]!);
    }
  }
  return ds + de;
}

/**
 * (s, comp) += α · A(:, col), with s updated by TwoSum and every rounding error (of the
 * product by TwoProduct, of the sum by TwoSum, and the low-part product) collected in comp.
 */
export function residualUpdate(A: DDMatrix, col: number, alpha: number, s: Float64Array, comp: Float64Array, m: number): void {
  const { data: hi, off, scale } = columnView(A, col);
  const lo = A.lo;
  const loOff = col * m;
  let t = SPLITTER * alpha;
  const xh = t - (t - alpha);
  const xl = alpha - xh;
  for (let i = 0; i < m; i++) {
    const a = hi[off + i]! * scale;
    const p = a * alpha;
    t = SPLITTER * a;
    const ah = t - (t - a);
    const al = a - ah;
    const pe = ah * xh - p + ah * xl + al * xh + al * xl;
    const si = s[i]!;
    const sn = si + p;
    const bb = sn - si;
    s[i] = sn;
    comp[i]! += si - (sn - bb) + (p - bb) + pe + (lo ? lo[loOff + i]! * alpha : 0);
  }
}

/**
 * c0 + A(:, col)ᵀ v as a double-double (out.hi + out.lo), compensated (Dot2, the low parts of A in
 * working precision), with v given as Dekker halves vh + vl (+ an optional low part vlo, in working
 * precision): the dot-product half of fusedColumnPass (WebAssembly twin: dot2 in kernels.wat).
 */
export function dot2(A: DDMatrix, col: number, vh: Float64Array, vl: Float64Array, m: number, c0: number, out: DD, vlo: Float64Array | null = null): DD {
  const { data: hi, off, scale } = columnView(A, col);
  const lo = A.lo;
  let ds = c0;
  let de = 0;
  for (let i = 0; i < m; i++) {
    const a = hi[off + i]! * scale;
    const t = SPLITTER * a;
    const ah = t - (t - a);
    const al = a - ah;
    const bh = vh[i]!;
    const bl = vl[i]!;
    const q = a * (bh + bl);
    const dn = ds + q;
    const cc = dn - ds;
    de += ds - (dn - cc) + (q - cc) + (ah * bh - q + ah * bl + al * bh + al * bl);
    ds = dn;
  }
  if (lo) for (let i = 0, o = col * m; i < m; i++) de += lo[o + i]! * (vh[i]! + vl[i]!);
  if (vlo) for (let i = 0; i < m; i++) de += hi[off + i]! * scale * vlo[i]!;
  const x = ds + de;
  out.hi = x;
  out.lo = de - (x - ds);
  return out;
}

/**
 * (s, comp) += A(:, col)·(α + αLo): residualUpdate with a double-double multiplier, the product
 * with its low part added in working precision (WebAssembly twin: axpy2 in kernels.wat).
 */
export function axpy2(A: DDMatrix, col: number, alpha: number, alphaLo: number, s: Float64Array, comp: Float64Array, m: number): void {
  residualUpdate(A, col, alpha, s, comp, m);
  if (alphaLo === 0) return;
  const { data: hi, off, scale } = columnView(A, col);
  for (let i = 0; i < m; i++) comp[i]! += hi[off + i]! * scale * alphaLo;
}

/**
 * The Gram matrix G = Aᵀ A of the columns `cols` of the exact design A = Ahi + Alo, as a
 * double-double (hi + lo, each nk × nk, symmetric, column-major). Every product of high parts is
 * exact (TwoProduct) and summed with TwoSum; cross terms with the low parts are added in working
 * precision (they are 2^-53 smaller). Rows are processed in blocks whose Dekker halves are split
 * once into small buffers, so each entry is split once per block rather than once per pair.
 */
export function ddGram(A: DDMatrix, cols: Int32Array, nk: number): { hi: Float64Array; lo: Float64Array } {
  const m = A.m;
  const { lo } = A;
  const sHi = new Float64Array(nk * nk);
  const sLo = new Float64Array(nk * nk);
  const B = 256;
  const h = new Float64Array(B * nk); // high halves of the block
  const l = new Float64Array(B * nk); // low halves
  const v = new Float64Array(B * nk); // values
  for (let i0 = 0; i0 < m; i0 += B) {
    const nb = Math.min(B, m - i0);
    for (let k = 0; k < nk; k++) {
      const cv = columnView(A, cols[k]!);
      const src = cv.data;
      const off = cv.off + i0;
      const sc = cv.scale;
      const o = k * B;
      for (let i = 0; i < nb; i++) {
        const a = src[off + i]! * sc;
        const t = SPLITTER * a;
        const ah = t - (t - a);
        v[o + i] = a;
        h[o + i] = ah;
        l[o + i] = a - ah;
      }
    }
    // Pairs (a, b) and (a, b + 1) are summed together: column a is loaded once for both, and
    // the two compensated sums are independent chains.
    for (let b = 0; b < nk; b += 2) {
      const b2 = b + 1;
      const ob = b * B;
      const ob2 = b2 * B;
      for (let a = 0; a <= b; a++) {
        const oa = a * B;
        if (b2 < nk) {
          let s = sHi[b * nk + a]!;
          let e = sLo[b * nk + a]!;
          let s2 = sHi[b2 * nk + a]!;
          let e2 = sLo[b2 * nk + a]!;
          for (let i = 0; i < nb; i++) {
            const x = v[oa + i]!;
            const xh = h[oa + i]!;
            const xl = l[oa + i]!;
            const y = v[ob + i]!;
            const yh = h[ob + i]!;
            const yl = l[ob + i]!;
            const z = v[ob2 + i]!;
            const zh = h[ob2 + i]!;
            const zl = l[ob2 + i]!;
            const p = x * y;
            const q = x * z;
            const sn = s + p;
            const tn = s2 + q;
            const bb = sn - s;
            const cc = tn - s2;
            e += s - (sn - bb) + (p - bb) + (xh * yh - p + xh * yl + xl * yh + xl * yl);
            e2 += s2 - (tn - cc) + (q - cc) + (xh * zh - q + xh * zl + xl * zh + xl * zl);
            s = sn;
            s2 = tn;
          }
          sHi[b * nk + a] = s;
          sLo[b * nk + a] = e;
          sHi[b2 * nk + a] = s2;
          sLo[b2 * nk + a] = e2;
        } else singleDot(v, h, l, oa, ob, nb, sHi, sLo, b * nk + a);
      }
      if (b2 < nk) singleDot(v, h, l, b2 * B, ob2, nb, sHi, sLo, b2 * nk + b2);
    }
    if (lo)
      for (let b = 0; b < nk; b++) {
        const offB = cols[b]! * m + i0;
        for (let a = 0; a <= b; a++) {
          const offA = cols[a]! * m + i0;
          let e = 0;
          for (let i = 0; i < nb; i++) e += v[a * B + i]! * lo[offB + i]! + lo[offA + i]! * v[b * B + i]!;
          sLo[b * nk + a]! += e;
        }
      }
  }
  for (let b = 0; b < nk; b++)
    for (let a = 0; a <= b; a++) {
      const s = sHi[b * nk + a]!;
      const e = sLo[b * nk + a]!;
      const x = s + e;
      const y = e - (x - s);
      sHi[b * nk + a] = sHi[a * nk + b] = x;
      sLo[b * nk + a] = sLo[a * nk + b] = y;
    }
  return { hi: sHi, lo: sLo };
}

/** One compensated dot product of two split block columns, accumulated into (sHi, sLo)[at]. */
function singleDot(v: Float64Array, h: Float64Array, l: Float64Array, oa: number, ob: number, nb: number, sHi: Float64Array, sLo: Float64Array, at: number): void {
  let s = sHi[at]!;
  let e = sLo[at]!;
  for (let i = 0; i < nb; i++) {
    const x = v[oa + i]!;
    const y = v[ob + i]!;
    const p = x * y;
    const sn = s + p;
    const bb = sn - s;
    e += s - (sn - bb) + (p - bb) + (h[oa + i]! * h[ob + i]! - p + h[oa + i]! * l[ob + i]! + l[oa + i]! * h[ob + i]! + l[oa + i]! * l[ob + i]!);
    s = sn;
  }
  sHi[at] = s;
  sLo[at] = e;
}
