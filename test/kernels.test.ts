/**
 * The WebAssembly kernels (src/core/kernels.wat) against their JavaScript twins, and the whole
 * fit with and without them. The per-row compensated residuals are the same arithmetic in the
 * same order, so they must agree bit for bit; sums over rows are kept in two lanes by the kernels,
 * so those agree to the accuracy of the sums themselves; the fast path's dot2 and axpy2 are checked
 * the same way, directly. The committed module must match its
 * source (scripts/build-wasm.mjs --check).
 */
import { spawnSync } from "node:child_process";
import { resolve } from "node:path";
import { describe, expect, it } from "vitest";
import { kernelsAvailable, Workspace } from "../src/core/kernels";
import { HouseholderQR, tmatLength } from "../src/core/qr";
import { axpy2, dot2, fusedColumnPass, type DDMatrix } from "../src/core/refine";
import { LeastSquaresFit } from "../src/core/fit";
import { leverage } from "../src/core/leverage";
import { normal, rng } from "./helpers/gen";

describe("WebAssembly kernels", () => {
  it("are available on this platform (Node.js has WebAssembly SIMD)", () => {
    expect(kernelsAvailable()).toBe(true);
  });

  it("the committed module is assembled from kernels.wat", () => {
    const r = spawnSync(process.execPath, [resolve(__dirname, "../scripts/build-wasm.mjs"), "--check"], { encoding: "utf8" });
    expect(r.stderr).toBe("");
    expect(r.status).toBe(0);
  });

  it("fused compensated pass: per-row residuals bit for bit, the dot product to its own accuracy", () => {
    for (const [m, withLow] of [[1, false], [2, true], [7, false], [1000, true], [1001, false]] as const) {
      const r = rng(m);
      const ws = Workspace.create(8 * m + 64)!;
      const col = ws.alloc(m);
      const lo = ws.alloc(m);
      const s = ws.alloc(m);
      const comp = ws.alloc(m);
      const vh = ws.alloc(m);
      const vl = ws.alloc(m);
      for (let i = 0; i < m; i++) {
        col[i] = normal(r) * 2 ** Math.round(normal(r) * 20);
        lo[i] = withLow ? col[i]! * 2 ** -55 : 0;
        s[i] = normal(r);
        comp[i] = normal(r) * 1e-17;
        const b = normal(r);
        const u = 134217729 * b;
        vh[i] = u - (u - b);
        vl[i] = b - vh[i]!;
      }
      const alpha = normal(r) * 3;
      const js = { s: Float64Array.from(s), comp: Float64Array.from(comp) };
      const A = { m, hi: Float64Array.from(col), lo: withLow ? Float64Array.from(lo) : null };
      const gJs = fusedColumnPass(A, 0, alpha, js.s, js.comp, 0.25, vh, vl, m);
      const gWasm = ws.k.fused(col.byteOffset, withLow ? lo.byteOffset : 0, 1, alpha, s.byteOffset, comp.byteOffset, vh.byteOffset, vl.byteOffset, m, 0.25);
      expect(Array.from(s)).toEqual(Array.from(js.s));
      expect(Array.from(comp)).toEqual(Array.from(js.comp));
      let mag = 0.25;
      for (let i = 0; i < m; i++) mag += Math.abs(col[i]! * (vh[i]! + vl[i]!));
      expect(Math.abs(gWasm - gJs)).toBeLessThanOrEqual(4e-32 * m * mag + 2.3e-16 * Math.abs(gJs));
    }
  });

  it("dot2 and axpy2 (the fast path's passes): the running sums bit for bit, their low-order parts to their own accuracy", () => {
    // columns given as a scaled view (scale 0.5) or with low parts, v with or without a low part
    for (const [m, withLow, withVlo] of [[1, false, false], [2, true, true], [7, false, true], [1000, true, false], [1001, false, true]] as const) {
      const r = rng(7 * m + 1);
      const ws = Workspace.create(10 * m + 64)!;
      const col = ws.alloc(m);
      const lo = ws.alloc(m);
      const s = ws.alloc(m);
      const comp = ws.alloc(m);
      const vh = ws.alloc(m);
      const vl = ws.alloc(m);
      const vlo = ws.alloc(m);
      const out = ws.alloc(2);
      const raw = new Float64Array(m);
      for (let i = 0; i < m; i++) {
        raw[i] = normal(r) * 2 ** Math.round(normal(r) * 20);
        col[i] = withLow ? raw[i]! : raw[i]! * 0.5;
        lo[i] = withLow ? col[i]! * 2 ** -55 : 0;
        s[i] = normal(r);
        comp[i] = normal(r) * 1e-17;
        const b = normal(r);
        const u = 134217729 * b;
        vh[i] = u - (u - b);
        vl[i] = b - vh[i]!;
        vlo[i] = withVlo ? b * 2 ** -54 : 0;
      }
      // the JavaScript twins read the column through the design: with low parts, or as a view
      const A: DDMatrix = withLow ? { m, hi: Float64Array.from(col), lo: Float64Array.from(lo) } : { m, hi: new Float64Array(0), lo: null, cols: [{ data: raw, off: 0, scale: 0.5 }] };
      const scale = 1; // the kernels get the column already scaled (solveWith copies it so)
      const c0 = normal(r);
      const dJs = dot2(A, 0, vh, vl, m, c0, { hi: 0, lo: 0 }, withVlo ? Float64Array.from(vlo) : null);
      ws.k.dot2(col.byteOffset, withLow ? lo.byteOffset : 0, scale, vh.byteOffset, vl.byteOffset, m, c0, out.byteOffset, withVlo ? vlo.byteOffset : 0);
      let mag = Math.abs(c0);
      for (let i = 0; i < m; i++) mag += Math.abs(col[i]! * (vh[i]! + vl[i]!));
      expect(Math.abs(out[0]! + out[1]! - (dJs.hi + dJs.lo))).toBeLessThanOrEqual(4e-32 * m * mag + 1e-31 * Math.abs(dJs.hi));

      const alpha = normal(r) * 3;
      const alphaLo = alpha * 2 ** -60;
      const js = { s: Float64Array.from(s), comp: Float64Array.from(comp) };
      axpy2(A, 0, alpha, alphaLo, js.s, js.comp, m);
      ws.k.axpy2(col.byteOffset, withLow ? lo.byteOffset : 0, scale, alpha, alphaLo, s.byteOffset, comp.byteOffset, m);
      expect(Array.from(s)).toEqual(Array.from(js.s));
      // comp gathers the same small terms, associated in another order: a few units in its last
      // place of the largest of them (comp itself and a·α·2^-52 bound them)
      for (let i = 0; i < m; i++) expect(Math.abs(comp[i]! - js.comp[i]!)).toBeLessThanOrEqual(2 ** -50 * (Math.abs(js.comp[i]!) + Math.abs(col[i]! * alpha) * 2 ** -50));
    }
  });

  it("block reflectors: the factorization with kernels matches the JavaScript one to rounding", () => {
    for (const [m, p] of [[5, 5], [9, 8], [200, 13], [1001, 9]] as const) {
      const r = rng(m * p);
      const a = new Float64Array(m * p);
      for (let t = 0; t < a.length; t++) a[t] = normal(r);
      const plain = new HouseholderQR(Float64Array.from(a), m, p);
      const ws = Workspace.create(m * p + tmatLength(m, p) + 64)!;
      const buf = ws.alloc(m * p);
      buf.set(a);
      const fast = new HouseholderQR(buf, m, p, undefined, ws);
      expect(fast.ws).toBe(ws);
      expect(Array.from(fast.kept)).toEqual(Array.from(plain.kept));
      for (let k = 0; k < fast.rank; k++)
        for (let i = 0; i <= k; i++) expect(Math.abs(fast.r(i, k) - plain.r(i, k))).toBeLessThanOrEqual(1e-13 * Math.abs(plain.r(k, k)) * Math.sqrt(m));
      // applyQt then applyQ returns the vector (Q orthogonal), through the kernels
      const v = ws.alloc(m);
      for (let i = 0; i < m; i++) v[i] = normal(r);
      const v0 = Float64Array.from(v);
      fast.applyQt(fast.rank, v);
      fast.applyQ(fast.rank, v);
      for (let i = 0; i < m; i++) expect(Math.abs(v[i]! - v0[i]!)).toBeLessThanOrEqual(1e-13);
    }
  });

  it("a whole fit agrees with the JavaScript-only fit (coefficients, residuals, covariance to 1e-14)", () => {
    const m = 3000;
    const k = 6;
    const r = rng(99);
    const x = new Float64Array(m * k);
    for (let t = 0; t < x.length; t++) x[t] = normal(r) * (1 + (t % 5));
    const y = new Float64Array(m);
    for (let i = 0; i < m; i++) y[i] = normal(r) + x[i]! - 2 * x[m + i]!;
    for (const weights of [null, Float64Array.from({ length: m }, (_, i) => 1 + (i % 3))]) {
      const spec = { y, x, rows: m, cols: k, intercept: true, weights };
      const a = new LeastSquaresFit(spec, { kernels: false });
      const b = new LeastSquaresFit(spec);
      const rel = (u: number, v: number) => Math.abs(u - v) / Math.max(Math.abs(u), Math.abs(v), 1e-300);
      a.coefficients().forEach((v, j) => expect(rel(v, b.coefficients()[j]!)).toBeLessThanOrEqual(1e-14));
      const ra = a.fittedAndResiduals().resid;
      const rb = b.fittedAndResiduals().resid;
      let d = 0;
      let n = 0;
      for (let i = 0; i < m; i++) {
        d = Math.max(d, Math.abs(ra[i]! - rb[i]!));
        n = Math.max(n, Math.abs(ra[i]!));
      }
      expect(d).toBeLessThanOrEqual(1e-14 * n);
      const ca = a.scaledCovariance();
      const cb = b.scaledCovariance();
      ca.forEach((v, t) => expect(rel(v, cb[t]!)).toBeLessThanOrEqual(1e-13));
      // leverage on the fast path: the kernel does each row's operations in the JavaScript order,
      // so on the same factor it is bit for bit the same
      expect(b.method).toBe("normal");
      const la = Array.from(leverage(b.design, b.n, b.factor, b.householder, false));
      expect(Array.from(b.leverageUsed())).toEqual(la);
    }
  });
});
