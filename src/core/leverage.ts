/**
 * Leverage h_i of each used row: the diagonal of the weighted hat matrix X̃_K (X̃_KᵀX̃_K)⁻¹ X̃_Kᵀ.
 *
 * - Householder path: h_i = ‖e_iᵀ Q₁‖², the squared row norms of the first `rank` columns of Q,
 *   formed one column at a time by applying the reflectors to e_k. Q₁ is orthonormal to a few ε
 *   whatever the conditioning, so each h_i is accurate to about ε·p absolute — 13 digits or more
 *   for designs with κ ≤ 1e5 — where a formula through R⁻ᵀ loses κ·ε.
 * - Fast path (no Q of the design; condition numbers below about 50 with unit columns):
 *   h_i = ‖R⁻ᵀ x̃_i‖², rows in blocks (the WebAssembly kernel `lev` or its JavaScript twin);
 *   accurate to about κ·ε ≤ 1e-14 there.
 */
import { Workspace } from "./kernels";
import type { Factor, HouseholderQR } from "./qr";
import { columnView, type ColumnView, type DDMatrix } from "./refine";
import { twoProd, type DD } from "./dd";

export function leverage(design: DDMatrix, n: number, factor: Factor, householder: HouseholderQR | null, kernels: boolean): Float64Array {
  const h = new Float64Array(n);
  const r = factor.rank;
  if (r === 0) return h;
  if (householder) return leverageFromQ(householder, h);
  if (kernels && leverageKernel(design, n, factor, h)) return h;
  const B = 512;
  const z = new Float64Array(B * r);
  for (let i0 = 0; i0 < n; i0 += B) {
    const nb = Math.min(B, n - i0);
    for (let k = 0; k < r; k++) {
      const zk = k * B;
      const cv = columnView(design, factor.kept[k]!);
      const src = cv.off + i0;
      for (let i = 0; i < nb; i++) z[zk + i] = cv.data[src + i]! * cv.scale;
      for (let l = 0; l < k; l++) {
        const rl = factor.r(l, k);
        if (rl === 0) continue;
        const zl = l * B;
        for (let i = 0; i < nb; i++) z[zk + i]! -= rl * z[zl + i]!;
      }
      const inv = 1 / factor.r(k, k);
      for (let i = 0; i < nb; i++) {
        const v = z[zk + i]! * inv;
        z[zk + i] = v;
        h[i0 + i]! += v * v;
      }
    }
  }
  return h;
}

/**
 * Leverage corrected for the factor's own rounding (Householder path, n·r² ≤
 * LEVERAGE_REFINED_MAX_WORK). With R the computed triangular factor, W = X̃_K R⁻¹ spans exactly
 * the kept columns of the exact design but is orthonormal only up to E = WᵀW − I (of size κ·ε,
 * from R's backward error). So the hat matrix is W (I + E)⁻¹ Wᵀ and
 *
 *     h_i = ‖w_i‖² − w_iᵀ E w_i + w_iᵀ E² w_i + O(κ³ε³)
 *
 * Each row w_i comes from Rᵀ w_i = x̃_i by forward substitution in double-double, ‖w_i‖² and E are
 * accumulated in compensated arithmetic, so h_i is accurate to a few ε whatever the conditioning
 * up to κ ≈ 1e5 (beyond, the neglected terms grow as (κε)³). Two passes over the rows; W is kept
 * (n·r doubles) between them.
 */
export function leverageRefined(design: DDMatrix, n: number, factor: Factor): Float64Array {
  const r = factor.rank;
  const h = new Float64Array(n);
  const views = Array.from(factor.kept.subarray(0, r), (c) => columnView(design, c));
  const lo = design.lo;
  const Rm = upperOf(factor);
  const W = new Float64Array(n * r);
  const xh = new Float64Array(r);
  const xl = new Float64Array(r);
  const wh = new Float64Array(r);
  const wl = new Float64Array(r);
  const Gh = new Float64Array(r * r);
  const Gl = new Float64Array(r * r);
  const s = new Float64Array(n);
  const tmp: DD = { hi: 0, lo: 0 };
  for (let t = 0; t < n; t++) {
    // Rᵀ w = x̃_t in double-double
    designRow(views, lo, factor.kept, n, t, xh, xl);
    forwardDD(Rm, r, xh, xl, wh, wl, tmp);
    // ‖w‖² compensated: q² exactly + 2·q·wl
    let ss = 0;
    let se = 0;
    for (let k = 0; k < r; k++) {
      const q = wh[k]!;
      W[t * r + k] = q;
      twoProd(q, q, tmp);
      const sn = ss + tmp.hi;
      const bb = sn - ss;
      se += ss - (sn - bb) + (tmp.hi - bb) + tmp.lo + 2 * q * wl[k]!;
      ss = sn;
    }
    s[t] = ss + se;
    addOuter(Gh, Gl, wh, wl, r, tmp);
  }
  const E = defectFromIdentity(Gh, Gl, r);
  const K = correctionMatrix(E, r);
  for (let t = 0; t < n; t++) {
    let wKw = 0;
    for (let k = 0; k < r; k++) {
      let a = 0;
      for (let l = 0; l < r; l++) a += K[k * r + l]! * W[t * r + l]!;
      wKw += W[t * r + k]! * a;
    }
    h[t] = Math.max(0, s[t]! - wKw);
  }
  return h;
}

/**
 * E = WᵀW − I for W = X̃_K R⁻¹ (r × r, the same correction as in `leverageRefined`), from one
 * pass over the rows with each row of W solved in double-double. Predictions use it for the
 * leverage of a new point (`hatOfRow`).
 */
export function hatCorrection(design: DDMatrix, n: number, factor: Factor): Float64Array {
  const r = factor.rank;
  const views = Array.from(factor.kept.subarray(0, r), (c) => columnView(design, c));
  const lo = design.lo;
  const Rm = upperOf(factor);
  const wh = new Float64Array(r);
  const wl = new Float64Array(r);
  const xh = new Float64Array(r);
  const xl = new Float64Array(r);
  const Gh = new Float64Array(r * r);
  const Gl = new Float64Array(r * r);
  const tmp: DD = { hi: 0, lo: 0 };
  for (let t = 0; t < n; t++) {
    designRow(views, lo, factor.kept, n, t, xh, xl);
    forwardDD(Rm, r, xh, xl, wh, wl, tmp);
    addOuter(Gh, Gl, wh, wl, r, tmp);
  }
  return defectFromIdentity(Gh, Gl, r);
}

/**
 * K = (I + E)⁻¹E for the symmetric correction E (Cholesky of I + E, which is close to I), so that
 * wᵀ(I + E)⁻¹w = ‖w‖² − wᵀKw exactly, with no series to truncate.
 */
export function correctionMatrix(E: Float64Array, r: number): Float64Array {
  const L = new Float64Array(r * r); // lower Cholesky factor of I + E, row-major L[i·r + j]
  for (let i = 0; i < r; i++)
    for (let j = 0; j <= i; j++) {
      let v = E[i * r + j]! + (i === j ? 1 : 0);
      for (let k = 0; k < j; k++) v -= L[i * r + k]! * L[j * r + k]!;
      L[i * r + j] = i === j ? Math.sqrt(Math.max(v, Number.MIN_VALUE)) : v / L[j * r + j]!;
    }
  const K = new Float64Array(r * r);
  const col = new Float64Array(r);
  for (let c = 0; c < r; c++) {
    for (let i = 0; i < r; i++) {
      let v = E[i * r + c]!;
      for (let k = 0; k < i; k++) v -= L[i * r + k]! * col[k]!;
      col[i] = v / L[i * r + i]!;
    }
    for (let i = r - 1; i >= 0; i--) {
      let v = col[i]!;
      for (let k = i + 1; k < r; k++) v -= L[k * r + i]! * col[k]!;
      col[i] = v / L[i * r + i]!;
    }
    for (let i = 0; i < r; i++) K[i * r + c] = col[i]!;
  }
  return K;
}

/** Rᵀ w = x (x and w as double-double hi/lo vectors of length rank), forward substitution in double-double. */
export function solveRtDD(factor: Factor, xh: Float64Array, xl: Float64Array, wh: Float64Array, wl: Float64Array): void {
  forwardDD(upperOf(factor), factor.rank, xh, xl, wh, wl, { hi: 0, lo: 0 });
}

/** Row t of the kept design columns as a double-double (xh, xl). */
function designRow(views: readonly ColumnView[], lo: Float64Array | null, kept: Int32Array, n: number, t: number, xh: Float64Array, xl: Float64Array): void {
  for (let k = 0; k < xh.length; k++) {
    const v = views[k]!;
    xh[k] = v.data[v.off + t]! * v.scale;
    xl[k] = lo ? lo[kept[k]! * n + t]! : 0;
  }
}

/** The kept r × r triangle of R, dense: R(l, k) at k·r + l (for row-by-row solves). */
function upperOf(factor: Factor): Float64Array {
  const r = factor.rank;
  const Rm = new Float64Array(r * r);
  for (let k = 0; k < r; k++) for (let l = 0; l <= k; l++) Rm[k * r + l] = factor.r(l, k);
  return Rm;
}

/** Rᵀ w = x by forward substitution in double-double: w_k = (x_k − Σ_{l<k} R(l,k)·w_l) / R(k,k). */
function forwardDD(Rm: Float64Array, r: number, xh: Float64Array, xl: Float64Array, wh: Float64Array, wl: Float64Array, tmp: DD): void {
  for (let k = 0; k < r; k++) {
    let acc = xh[k]!;
    let err = xl[k]!;
    for (let l = 0; l < k; l++) {
      const rl = Rm[k * r + l]!;
      if (rl === 0) continue;
      twoProd(rl, -wh[l]!, tmp);
      const sn = acc + tmp.hi;
      const bb = sn - acc;
      err += acc - (sn - bb) + (tmp.hi - bb) + tmp.lo - rl * wl[l]!;
      acc = sn;
    }
    const d = Rm[k * r + k]!;
    const q = (acc + err) / d;
    twoProd(q, d, tmp);
    wh[k] = q;
    wl[k] = (acc - tmp.hi - tmp.lo + err) / d;
  }
}

/**
 * The hat value z̃ᵀ(X̃_KᵀX̃_K)⁻¹z̃ of a design row z̃ (scaled units, kept columns, double-double)
 * with the correction K = (I + E)⁻¹E: w = R⁻ᵀz̃ in double-double, h = ‖w‖² − wᵀKw.
 */
export function hatOfRow(factor: Factor, K: Float64Array, zh: Float64Array, zl: Float64Array): number {
  const r = factor.rank;
  const wh = new Float64Array(r);
  const wl = new Float64Array(r);
  solveRtDD(factor, zh, zl, wh, wl);
  const tmp: DD = { hi: 0, lo: 0 };
  let ss = 0;
  let se = 0;
  for (let k = 0; k < r; k++) {
    twoProd(wh[k]!, wh[k]!, tmp);
    const sn = ss + tmp.hi;
    const bb = sn - ss;
    se += ss - (sn - bb) + (tmp.hi - bb) + tmp.lo + 2 * wh[k]! * wl[k]!;
    ss = sn;
  }
  let wKw = 0;
  for (let k = 0; k < r; k++) {
    let a = 0;
    for (let l = 0; l < r; l++) a += K[k * r + l]! * wh[l]!;
    wKw += wh[k]! * a;
  }
  return Math.max(0, ss + se - wKw);
}

/** h_i = Σ_k (Q e_k)_i², one column of Q₁ at a time (in the factor's workspace when it has one). */
function leverageFromQ(qr: HouseholderQR, h: Float64Array): Float64Array {
  const m = qr.m;
  const r = qr.rank;
  const ws = qr.ws;
  const mark = ws ? ws.mark() : 0;
  let v: Float64Array;
  try {
    v = ws ? ws.alloc(m) : new Float64Array(m);
  } catch {
    v = new Float64Array(m); // the workspace is full: the JavaScript twins serve
  }
  for (let k = 0; k < r; k++) {
    v.fill(0);
    v[k] = 1;
    qr.applyQ(r, v);
    for (let i = 0; i < m; i++) h[i]! += v[i]! * v[i]!;
  }
  if (ws) ws.release(mark);
  return h;
}

/** The R⁻ᵀ loop as the WebAssembly kernel `lev`, over panels of rows; false when unavailable. */
function leverageKernel(design: DDMatrix, n: number, factor: Factor, h: Float64Array): boolean {
  const r = factor.rank;
  const P = 1024;
  const ws = Workspace.scratch(2 * r * P + r * r + r + P + 64);
  if (!ws) return false;
  const panel = ws.alloc(r * P);
  const z = ws.alloc(r * P);
  const R = ws.alloc(r * r);
  const scales = ws.alloc(r);
  const hp = ws.alloc(P);
  for (let k = 0; k < r; k++) for (let l = 0; l <= k; l++) R[k * r + l] = factor.r(l, k);
  const views = Array.from(factor.kept.subarray(0, r), (c) => columnView(design, c));
  views.forEach((v, k) => (scales[k] = v.scale));
  for (let i0 = 0; i0 < n; i0 += P) {
    const rows = Math.min(P, n - i0);
    views.forEach((v, k) => panel.set(v.data.subarray(v.off + i0, v.off + i0 + rows), k * P));
    ws.k.lev(panel.byteOffset, r, rows, P, scales.byteOffset, R.byteOffset, z.byteOffset, hp.byteOffset);
    h.set(hp.subarray(0, rows), i0);
  }
  return true;
}

/** G += w wᵀ on the upper triangle (column-major r × r), G and w double-double, compensated. */
function addOuter(Gh: Float64Array, Gl: Float64Array, wh: Float64Array, wl: Float64Array, r: number, tmp: DD): void {
  for (let k = 0; k < r; k++)
    for (let l = 0; l <= k; l++) {
      const at = k * r + l;
      twoProd(wh[k]!, wh[l]!, tmp);
      const g = Gh[at]!;
      const sn = g + tmp.hi;
      const bb = sn - g;
      Gl[at]! += g - (sn - bb) + (tmp.hi - bb) + tmp.lo + wh[k]! * wl[l]! + wl[k]! * wh[l]!;
      Gh[at] = sn;
    }
}

/** E = G − I (symmetric, full), in double: it is of size κε and needed to ε absolute. */
function defectFromIdentity(Gh: Float64Array, Gl: Float64Array, r: number): Float64Array {
  const E = new Float64Array(r * r);
  for (let k = 0; k < r; k++)
    for (let l = 0; l <= k; l++) {
      const v = Gh[k * r + l]! - (k === l ? 1 : 0) + Gl[k * r + l]!;
      E[k * r + l] = v;
      E[l * r + k] = v;
    }
  return E;
}
