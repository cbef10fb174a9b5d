/**
 * Householder QR with an ordered rank decision ("keep or flag, in the user's order").
 *
 *     A(:, kept) = Q · R,   Q = H_0 · H_1 ⋯ H_{r-1},   H_k = I − τ_k v_k v_kᵀ
 *
 * A is m×p, column-major, already equilibrated by the caller. Columns are visited left to
 * right. Column j is first reduced by the reflectors of the columns kept before it (a
 * left-looking sweep); what remains below row k (k = columns kept so far) is its component
 * orthogonal to those columns. Column j is **non-identifiable** when
 *
 *     ‖(I − P_k) a_j‖₂ ≤ tol · ‖a_j‖₂
 *
 * where P_k projects onto the kept columns before j — strictly, the right-hand side is
 * `tol · (‖a_j‖₂ + Σ_i |z_i|·‖a_i‖₂)`, where a_j ≈ Σ z_i a_i is the relation expressing the
 * column in the kept columns before it. The extra sum is the size of the terms of that relation:
 * the remainder is computed with an error proportional to it (rounding in the earlier columns is
 * multiplied by z), so without it an exactly dependent column behind two nearly dependent ones
 * could escape detection. When the earlier columns are well conditioned the sum is of the order
 * of ‖a_j‖ and the test is the plain "relative to its own norm" one.
 * Otherwise a reflector is made from that remainder and j is kept. So the earliest columns of a
 * dependent set are kept and the later one is flagged; the test is invariant to scaling any
 * column. This is the only rank decision in the engine: solve, covariance, leverage and degrees
 * of freedom all use `kept`.
 *
 * Guarantees (tested in test/rank.test.ts): the rank is never more than the true rank of matrices
 * of known rank; a matrix with unit-norm columns whose smallest singular value is at least
 * 100·tol is full rank (its remainders are at least σ_min·max(1, ‖z‖₂), above the threshold for
 * up to several hundred columns).
 *
 * ## Tolerance `tol`
 * - Default: `defaultTolerance(m, p) = 10 · √(m·p) · ε` with ε = 2^-52 (tolerances.ts). Householder QR is
 *   column-wise backward stable: the computed R is exact for A + ΔA with ‖Δa_j‖ ≤ c·m·p·ε·‖a_j‖
 *   in the worst case and about √(m·p)·ε·‖a_j‖ in practice (errors add like a random walk). A
 *   column whose distance from the earlier columns is within that perturbation cannot be told
 *   apart from an exactly dependent one. The factor 10 is a margin for the rounding in the norms.
 * - `0`: only an exactly zero remainder is non-identifiable (all-zero columns, exact copies that
 *   round to the same values, and columns beyond the m-th kept one).
 * - `NaN` or `undefined`: the default.
 * - Negative: rejected (throws LsqError).
 * - ≥ 1 (including +Infinity): every column is non-identifiable (the remainder never exceeds
 *   the column norm); allowed but pointless.
 *
 * ## Packed storage (on exit, in `a`)
 * For the k-th kept column c = kept[k]: rows 0..k of column c hold R(0..k, k); rows k+1..m−1 hold
 * the reflector v_k without its leading 1. For a non-identifiable column j: rows 0..keptBefore[j]−1
 * hold Q_kᵀ a_j restricted to the kept coordinates (used for its dependency relation); the rest
 * holds the reduced remainder.
 */
import { LsqError } from "./errors";
import type { Workspace } from "./kernels";
import { defaultTolerance } from "./tolerances";

/**
 * What the rest of the engine may ask of a triangular factor, whichever path made it: R, the kept
 * columns (the one rank decision) and the two triangular solves. On the Householder path it is the
 * QR of the design; on the fast path (normal.ts) the QR of the p × p Cholesky factor, where Q is
 * not the design's, so Q operations are offered only by `HouseholderQR` itself.
 */
export interface Factor {
  /** Number of kept columns. */
  readonly rank: number;
  /** Design columns kept, in order (length = rank). */
  readonly kept: Int32Array;
  /** Design columns found non-identifiable, in order. */
  readonly dropped: Int32Array;
  /** For each design column j: how many kept columns precede it. */
  readonly keptBefore: Int32Array;
  /** The rank tolerance used (tolerances.ts). */
  readonly tolerance: number;
  /** R(i, k) for i ≤ k < rank. */
  r(i: number, k: number): number;
  /** Solve R(0:nk, 0:nk) z = v in place. */
  solveR(nk: number, v: Float64Array, off?: number): void;
  /** Solve R(0:nk, 0:nk)ᵀ z = v in place. */
  solveRt(nk: number, v: Float64Array, off?: number): void;
}

/** Reflectors are applied in groups of this many as one block reflector I − V T Vᵀ (compact WY). */
const GROUP = 4;

/** Doubles needed for the compact-WY factors of an m×p factorization. */
export function tmatLength(m: number, p: number): number {
  return Math.ceil(Math.min(m, p) / GROUP) * GROUP * GROUP;
}

export class HouseholderQR implements Factor {
  /** Number of rows. */
  readonly m: number;
  /** Number of columns visited (design columns). */
  readonly p: number;
  /** Packed factor, m×p column-major (see module comment). */
  readonly a: Float64Array;
  /** Reflector scalars τ_k, one per kept column. */
  readonly tau: Float64Array;
  /** Design columns kept, in order (length = rank). */
  readonly kept: Int32Array;
  /** Design columns found non-identifiable, in order. */
  readonly dropped: Int32Array;
  /** For each design column j: how many kept columns precede it. */
  readonly keptBefore: Int32Array;
  /** The tolerance actually used. */
  readonly tolerance: number;
  /** Rank: number of kept columns. */
  readonly rank: number;
  /**
   * Compact-WY factors: for each complete group of GROUP consecutive reflectors, the upper
   * triangular T (GROUP × GROUP, column-major) with H_g ⋯ H_{g+GROUP−1} = I − V T Vᵀ.
   */
  readonly tmat: Float64Array;
  /** The kept columns while the constructor is still deciding them. */
  private keptBuilding: number[] | null = null;
  /** The WebAssembly workspace holding `a` and `tmat`, when the kernels are used. */
  readonly ws: Workspace | null;

  /**
   * Factor `a` (m×p, column-major) in place.
   * @param a - design, overwritten with the packed factor
   * @param m - rows (≥ 0)
   * @param p - columns (≥ 0)
   * @param tol - rank tolerance; NaN/undefined = default, 0 = exact zero only, negative = error
   * @param ws - a WebAssembly workspace holding `a` (the block reflectors then run as kernels);
   *   it must have room for the compact-WY factors (`tmatLength(m, p)` doubles)
   */
  constructor(a: Float64Array, m: number, p: number, tol?: number, ws: Workspace | null = null) {
    if (a.length < m * p) throw new LsqError("shape", "design storage is smaller than rows × columns");
    let t = tol === undefined || Number.isNaN(tol) ? defaultTolerance(m, p) : tol;
    if (t < 0) throw new LsqError("range", "the rank tolerance must be zero or positive");
    this.m = m;
    this.p = p;
    this.a = a;
    this.tolerance = t;
    const tau = new Float64Array(Math.min(m, p));
    const kept: number[] = [];
    this.keptBuilding = kept;
    const dropped: number[] = [];
    const keptBefore = new Int32Array(p);
    let k = 0;
    const keptNorm = new Float64Array(Math.min(m, p));
    this.ws = ws && ws.holds(a) ? ws : null;
    const tmat = this.ws ? this.ws.alloc(tmatLength(m, p)) : new Float64Array(tmatLength(m, p));
    this.tmat = tmat;
    const z = new Float64Array(Math.min(m, p));
    for (let j = 0; j < p; j++) {
      const cj = j * m;
      const norm0 = nrm2(a, cj, m);
      // Left-looking: apply H_0 … H_{k−1} to column j.
      // Complete groups of GROUP reflectors as one block reflector, the rest one at a time.
      const full = k - (k % GROUP);
      for (let g = 0; g < full; g += GROUP) this.group(g, a, cj, true);
      for (let q = full; q < k; q++) applyReflector(a, kept[q]! * m, q, m, tau[q]!, cj);
      keptBefore[j] = k;
      const rest = k < m ? nrm2(a, cj + k, m - k) : 0;
      // Size of the relation's terms: Σ |z_i|·‖a_i‖ with R z = (Qᵀ a_j)(0:k).
      let terms = 0;
      if (k > 0 && norm0 > 0) {
        for (let i = 0; i < k; i++) z[i] = a[cj + i]!;
        for (let i = k - 1; i >= 0; i--) {
          const c = kept[i]! * m;
          const zi = z[i]! / a[c + i]!;
          z[i] = zi;
          for (let l = 0; l < i; l++) z[l]! -= a[c + l]! * zi;
        }
        for (let i = 0; i < k; i++) terms += Math.abs(z[i]!) * keptNorm[i]!;
      }
      if (norm0 === 0 || rest <= t * (norm0 + terms) || !(rest > 0)) {
        dropped.push(j);
        continue;
      }
      tau[k] = makeReflector(a, cj + k, m - k, rest);
      keptNorm[k] = norm0;
      kept.push(j);
      k++;
      if (k % GROUP === 0) buildGroupT(a, kept, k - GROUP, m, tau, tmat);
    }
    this.tau = tau;
    this.kept = Int32Array.from(kept);
    this.keptBuilding = null;
    this.dropped = Int32Array.from(dropped);
    this.keptBefore = keptBefore;
    this.rank = k;
  }

  /** Apply the block reflector of group g to c[cOff .. cOff+m): a kernel when both live in the workspace. */
  private group(g: number, c: Float64Array, cOff: number, transpose: boolean): void {
    const { ws, a, m } = this;
    // `kept` is still being built while factoring: read it through the field or the array in use.
    const kept = this.kept ?? this.keptBuilding!;
    if (ws && ws.holds(c)) {
      const base = a.byteOffset;
      ws.k.group(base + 8 * kept[g]! * m, base + 8 * kept[g + 1]! * m, base + 8 * kept[g + 2]! * m, base + 8 * kept[g + 3]! * m, g, m, this.tmat.byteOffset + 8 * g * GROUP, c.byteOffset + 8 * cOff, transpose ? 1 : 0);
    } else applyGroup(a, kept, g, m, this.tmat, c, cOff, transpose);
  }

  /** R(i, k) for i ≤ k < rank. */
  r(i: number, k: number): number {
    return this.a[this.kept[k]! * this.m + i]!;
  }

  /** v ← Qᵀ v using the first `nk` reflectors (v has length m, stride 1 from `off`). */
  applyQt(nk: number, v: Float64Array, off = 0): void {
    const full = Math.floor(Math.min(nk, this.rank) / GROUP) * GROUP;
    for (let g = 0; g < full; g += GROUP) this.group(g, v, off, true);
    for (let q = full; q < nk; q++) applyReflectorTo(this.a, this.kept[q]! * this.m, q, this.m, this.tau[q]!, v, off);
  }

  /** v ← Q v using the first `nk` reflectors. */
  applyQ(nk: number, v: Float64Array, off = 0): void {
    const full = Math.floor(Math.min(nk, this.rank) / GROUP) * GROUP;
    for (let q = nk - 1; q >= full; q--) applyReflectorTo(this.a, this.kept[q]! * this.m, q, this.m, this.tau[q]!, v, off);
    for (let g = full - GROUP; g >= 0; g -= GROUP) this.group(g, v, off, false);
  }

  /** Solve R(0:nk, 0:nk) z = v in place (back substitution); v[off .. off+nk). */
  solveR(nk: number, v: Float64Array, off = 0): void {
    const { a, m, kept } = this;
    for (let k = nk - 1; k >= 0; k--) {
      const c = kept[k]! * m;
      const zk = v[off + k]! / a[c + k]!;
      v[off + k] = zk;
      for (let i = 0; i < k; i++) v[off + i]! -= a[c + i]! * zk;
    }
  }

  /** Solve R(0:nk, 0:nk)ᵀ z = v in place (forward substitution). */
  solveRt(nk: number, v: Float64Array, off = 0): void {
    const { a, m, kept } = this;
    for (let k = 0; k < nk; k++) {
      const c = kept[k]! * m;
      let s = v[off + k]!;
      for (let i = 0; i < k; i++) s -= a[c + i]! * v[off + i]!;
      v[off + k] = s / a[c + k]!;
    }
  }

  /** The first `nk` columns of Q (m×nk, column-major): an orthonormal basis of the kept columns. */
  thinQ(nk = this.rank): Float64Array {
    const { m } = this;
    const out = new Float64Array(m * nk);
    for (let k = 0; k < nk; k++) {
      out[k * m + k] = 1;
      this.applyQ(nk, out, k * m);
    }
    return out;
  }
}

/** Euclidean norm of n entries from a[off], without harmful overflow or underflow. */
export function nrm2(a: Float64Array, off: number, n: number): number {
  let s = 0;
  for (let i = off, e = off + n; i < e; i++) {
    const v = a[i]!;
    s += v * v;
  }
  if (s > 1e-280 && s < 1e280) return Math.sqrt(s);
  // Rare path: rescale by the largest magnitude.
  let mx = 0;
  for (let i = off, e = off + n; i < e; i++) mx = Math.max(mx, Math.abs(a[i]!));
  if (mx === 0 || !Number.isFinite(mx)) return mx;
  s = 0;
  for (let i = off, e = off + n; i < e; i++) {
    const v = a[i]! / mx;
    s += v * v;
  }
  return mx * Math.sqrt(s);
}

/**
 * Turn x = a[off .. off+n) (with ‖x‖ = norm > 0) into a reflector: on exit a[off] = β and
 * a[off+1 ..] = v[1 ..] with v[0] = 1, so that (I − τ v vᵀ) x = β e₁. Returns τ.
 */
function makeReflector(a: Float64Array, off: number, n: number, norm: number): number {
  const alpha = a[off]!;
  const beta = alpha >= 0 ? -norm : norm;
  const tau = (beta - alpha) / beta;
  const inv = 1 / (alpha - beta);
  for (let i = off + 1, e = off + n; i < e; i++) a[i]! *= inv;
  a[off] = beta;
  return tau;
}

/** Apply H_q (reflector stored in column at vOff, pivot row q) to column at cOff of the same array. */
function applyReflector(a: Float64Array, vOff: number, q: number, m: number, tau: number, cOff: number): void {
  applyReflectorTo(a, vOff, q, m, tau, a, cOff);
}

/** Apply H_q to the vector c[cOff .. cOff+m). */
function applyReflectorTo(a: Float64Array, vOff: number, q: number, m: number, tau: number, c: Float64Array, cOff: number): void {
  if (tau === 0) return;
  const v0 = vOff + q;
  const c0 = cOff + q;
  const n = m - q;
  // s = vᵀc with v[0] = 1; four independent partial sums keep the adder pipeline busy.
  let s0 = c[c0]!;
  let s1 = 0;
  let s2 = 0;
  let s3 = 0;
  let i = 1;
  for (; i + 3 < n; i += 4) {
    s0 += a[v0 + i]! * c[c0 + i]!;
    s1 += a[v0 + i + 1]! * c[c0 + i + 1]!;
    s2 += a[v0 + i + 2]! * c[c0 + i + 2]!;
    s3 += a[v0 + i + 3]! * c[c0 + i + 3]!;
  }
  for (; i < n; i++) s0 += a[v0 + i]! * c[c0 + i]!;
  const s = tau * (s0 + s1 + (s2 + s3));
  c[c0]! -= s;
  for (i = 1; i < n; i++) c[c0 + i]! -= s * a[v0 + i]!;
}

/**
 * T for the group of GROUP reflectors starting at g (LAPACK's forward, columnwise dlarft):
 * T(t, t) = τ_t and T(0:t, t) = −τ_t · T(0:t, 0:t) · V(:, 0:t)ᵀ v_t.
 */
function buildGroupT(a: Float64Array, kept: readonly number[], g: number, m: number, tau: Float64Array, tmat: Float64Array): void {
  const T = g * GROUP; // offset of this group's T (groups are stored one after another)
  const w = new Float64Array(GROUP);
  for (let t = 0; t < GROUP; t++) {
    const qt = g + t;
    const vt = kept[qt]! * m;
    // w_s = v_sᵀ v_t for s < t; v_t is zero above row qt and 1 at row qt.
    for (let s = 0; s < t; s++) {
      const vs = kept[g + s]! * m;
      let d = a[vs + qt]!; // v_s(qt) · 1
      for (let i = qt + 1; i < m; i++) d += a[vs + i]! * a[vt + i]!;
      w[s] = d;
    }
    const tt = tau[qt]!;
    for (let s = 0; s < t; s++) {
      let v = 0;
      for (let u = s; u < t; u++) v += tmat[T + u * GROUP + s]! * w[u]!;
      tmat[T + t * GROUP + s] = -tt * v;
    }
    tmat[T + t * GROUP + t] = tt;
  }
}

/**
 * Apply the block reflector of the group starting at reflector g to c[cOff .. cOff+m):
 * transposed (Qᵀ c = c − V Tᵀ Vᵀ c) when `transpose`, else Q c = c − V T Vᵀ c. The four inner
 * products share one pass over c and the update is a second pass.
 */
function applyGroup(a: Float64Array, kept: readonly number[] | Int32Array, g: number, m: number, tmat: Float64Array, c: Float64Array, cOff: number, transpose: boolean): void {
  const T = g * GROUP;
  const v0 = kept[g]! * m;
  const v1 = kept[g + 1]! * m;
  const v2 = kept[g + 2]! * m;
  const v3 = kept[g + 3]! * m;
  const r0 = g; // first row touched
  // w = Vᵀ c. Rows g..g+3 are the triangular head of V (1 on the diagonal, 0 above).
  const c0 = c[cOff + r0]!;
  const c1 = c[cOff + r0 + 1]!;
  const c2 = c[cOff + r0 + 2]!;
  const c3 = c[cOff + r0 + 3]!;
  let w0 = c0 + a[v0 + r0 + 1]! * c1 + a[v0 + r0 + 2]! * c2 + a[v0 + r0 + 3]! * c3;
  let w1 = c1 + a[v1 + r0 + 2]! * c2 + a[v1 + r0 + 3]! * c3;
  let w2 = c2 + a[v2 + r0 + 3]! * c3;
  let w3 = c3;
  for (let i = r0 + GROUP; i < m; i++) {
    const ci = c[cOff + i]!;
    w0 += a[v0 + i]! * ci;
    w1 += a[v1 + i]! * ci;
    w2 += a[v2 + i]! * ci;
    w3 += a[v3 + i]! * ci;
  }
  // w ← Tᵀ w (transpose) or T w
  const t = (row: number, col: number): number => tmat[T + col * GROUP + row]!;
  let u0: number, u1: number, u2: number, u3: number;
  if (transpose) {
    u0 = t(0, 0) * w0;
    u1 = t(0, 1) * w0 + t(1, 1) * w1;
    u2 = t(0, 2) * w0 + t(1, 2) * w1 + t(2, 2) * w2;
    u3 = t(0, 3) * w0 + t(1, 3) * w1 + t(2, 3) * w2 + t(3, 3) * w3;
  } else {
    u0 = t(0, 0) * w0 + t(0, 1) * w1 + t(0, 2) * w2 + t(0, 3) * w3;
    u1 = t(1, 1) * w1 + t(1, 2) * w2 + t(1, 3) * w3;
    u2 = t(2, 2) * w2 + t(2, 3) * w3;
    u3 = t(3, 3) * w3;
  }
  // c −= V u
  c[cOff + r0] = c0 - u0;
  c[cOff + r0 + 1] = c1 - a[v0 + r0 + 1]! * u0 - u1;
  c[cOff + r0 + 2] = c2 - a[v0 + r0 + 2]! * u0 - a[v1 + r0 + 2]! * u1 - u2;
  c[cOff + r0 + 3] = c3 - a[v0 + r0 + 3]! * u0 - a[v1 + r0 + 3]! * u1 - a[v2 + r0 + 3]! * u2 - u3;
  for (let i = r0 + GROUP; i < m; i++) c[cOff + i]! -= a[v0 + i]! * u0 + a[v1 + i]! * u1 + a[v2 + i]! * u2 + a[v3 + i]! * u3;
}
