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
import { columnView, type DDMatrix } from "./refine";

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
