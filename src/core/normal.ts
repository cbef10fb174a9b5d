/**
 * The fast path for well-conditioned, full-rank designs: normal equations with a Gram matrix of
 * proven accuracy, refined in parameter space. No m × p factor is formed or stored.
 *
 *  1. G = AᵀA by `splitGram` (gram.ts), with a bound β ≥ ‖G̃ − G‖_F.
 *  2. R = Cholesky factor of G̃ (double). R is exact for G̃ + E with ‖E‖ ≲ p·ε·‖G‖, the same kind of
 *     guarantee a Householder R carries, so the engine's one rank decision (qr.ts) is taken by
 *     running HouseholderQR on R itself: its columns have the lengths of A's columns and the same
 *     remainders, so the ordered keep-or-flag test is unchanged (with the tolerance of the m × p
 *     problem).
 *  3. Accepted only when every column is kept and β·‖G⁻¹‖ = β/σ_min² ≤ ε/16: then the exact
 *     solution of G̃ x = Aᵀb differs from the least-squares solution by at most ε/16 relative.
 *     Otherwise the caller falls back to Householder QR with augmented-system refinement.
 *  4. c = Aᵀb as a double-double in one compensated pass (so another y over the same design reuses
 *     steps 1–3 and gives the same bits as a fresh fit). Then x ← x + R⁻¹R⁻ᵀ(c − G̃x) with the residual in
 *     compensated arithmetic and x kept as a double-double, until the correction is below the
 *     attainable level.
 *  5. The residual r = b − A·x in one compensated pass. Its error is at most ‖A‖·‖δx‖ with
 *     ‖δx‖ ≤ (β/σ_min²)·‖x‖ (+ rounding at the ε² level); accepted when that is below ε·‖r‖.
 *  6. Otherwise one corrected-seminormal step with the true residual (g = Aᵀr compensated,
 *     x ← x + R⁻¹R⁻ᵀg), which contracts x's error by ρ ≤ (2p(p+1)u + β)/σ_min², a new residual
 *     pass, and the same test; if it still fails (nearly exact fits) the caller falls back to the
 *     Householder path, whose refined residual does not depend on the accuracy of x.
 *
 * Passes over the data: one for G (the bulk of the work) and usually one for r (two more in
 * step 6), as WebAssembly kernels when a workspace is given (kernels.ts), else their JavaScript
 * twins.
 */
import { conditionNumber } from "./condition";
import { SPLITTER, type DD } from "./dd";
import { gramResidual, gramScratch, splitGram, splitGramBound, type BoundedGram } from "./gram";
import type { Workspace } from "./kernels";
import { HouseholderQR } from "./qr";
import { EPS } from "./tolerances";
import { axpy2, columnView, dot2, StopRule, type DDMatrix } from "./refine";

/** What the fast path keeps of a design, to solve for another right-hand side (same design, same rows). */
export interface NormalFactor {
  /** Householder QR of the Cholesky factor (p × p): R, the kept columns, the rank decision. */
  readonly qr: HouseholderQR;
  readonly gram: BoundedGram;
  readonly sigmaMin: number;
  /** Attainable relative accuracy of a solution, bound / σ_min². */
  readonly level: number;
}

export interface NormalSolution {
  /** Householder QR of the Cholesky factor (p × p): R, the kept columns, the rank decision. */
  qr: HouseholderQR;
  gram: BoundedGram;
  factor: NormalFactor;
  /** Solution (scaled), rounded to double. */
  x: Float64Array;
  /** Residual b − A x (scaled), length n. */
  r: Float64Array;
  steps: number;
}

/** Workspace doubles solveNormal needs for n rows and p columns. */
export function normalScratch(n: number, p: number): number {
  return Math.max(gramScratch(p + 1), 6 * n + 16) + 16;
}

/**
 * Solve min ‖b − A x‖ for the exact design A (n × p, columns of length ≤ 1) and b = bHi + bLo by
 * the fast path, or return null when its guarantees do not hold (see the module comment).
 */
export function solveNormal(
  A: DDMatrix,
  n: number,
  p: number,
  bHi: Float64Array,
  bLo: Float64Array | null,
  tol: number,
  ws: Workspace | null,
  prepared?: NormalFactor | null,
): { factor: NormalFactor | null; solution: NormalSolution | null } {
  if (p === 0 || n < p) return { factor: null, solution: null };
  // With the factor of another y over the same rows (`prepared`; null when the design itself did
  // not pass steps 1–3), only the y-dependent work is done — the same arithmetic as for the first
  // y, so both give the same bits.
  const factor = prepared === undefined ? prepare(A, n, p, tol, ws) : prepared;
  if (!factor) return { factor: null, solution: null };
  return { factor, solution: solveWith(A, n, p, bHi, bLo, ws, factor) };
}

/** Steps 1–3 (module comment): the Gram matrix, its Cholesky factor, the rank decision, the acceptance test. */
function prepare(A: DDMatrix, n: number, p: number, tol: number, ws: Workspace | null): NormalFactor | null {
  const bound = splitGramBound(n, p, !!A.lo);
  // Even a perfectly conditioned design cannot pass when the bound alone exceeds ε/16.
  if (bound > EPS / 16) return null;
  const all = Int32Array.from({ length: p }, (_, j) => j);
  const gram = splitGram(A, all, p, ws);

  // Cholesky of G̃ (upper R, column-major p × p).
  const R = new Float64Array(p * p);
  for (let j = 0; j < p; j++) {
    for (let i = 0; i < j; i++) {
      let s = gram.hi[j * p + i]!;
      for (let k = 0; k < i; k++) s -= R[i * p + k]! * R[j * p + k]!;
      R[j * p + i] = s / R[i * p + i]!;
    }
    let d = gram.hi[j * p + j]!;
    for (let k = 0; k < j; k++) d -= R[j * p + k]! ** 2;
    if (!(d > 0)) return null;
    R[j * p + j] = Math.sqrt(d);
  }
  const qr = new HouseholderQR(R, p, p, tol);
  if (qr.rank < p) return null;
  const sigmaMin = conditionNumber(qr).sigmaMin;
  const level = bound / (sigmaMin * sigmaMin); // attainable relative accuracy of x
  if (!(level <= EPS / 16)) return null;
  return { qr, gram, sigmaMin, level };
}

/** Steps 4–6 (module comment) for one right-hand side. */
function solveWith(A: DDMatrix, n: number, p: number, bHi: Float64Array, bLo: Float64Array | null, ws: Workspace | null, factor: NormalFactor): NormalSolution | null {
  const { qr, gram, sigmaMin, level } = factor;
  const bound = gram.bound;

  // Work vectors (in the workspace when there is one, for the kernels): b's Dekker halves, later
  // those of the residual; the residual s + comp; a column slot (and its low part).
  const mark = ws ? ws.mark() : 0;
  const vec = (): Float64Array => (ws ? ws.alloc(n) : new Float64Array(n));
  const col = ws ? ws.alloc(n) : null;
  const lo = ws && A.lo ? ws.alloc(n) : null;
  const vh = vec();
  const vl = vec();
  const s = vec();
  const comp = vec();
  const out = ws ? ws.alloc(2) : null;
  const dd: DD = { hi: 0, lo: 0 };
  const load = (j: number): { ptr: number; loPtr: number; scale: number } => {
    const cv = columnView(A, j);
    col!.set(cv.data.subarray(cv.off, cv.off + n));
    if (lo) lo.set(A.lo!.subarray(j * n, (j + 1) * n));
    return { ptr: col!.byteOffset, loPtr: lo ? lo.byteOffset : 0, scale: cv.scale };
  };
  const split = (v: Float64Array): void => {
    for (let i = 0; i < n; i++) {
      const b = v[i]!;
      const u = SPLITTER * b;
      const h = u - (u - b);
      vh[i] = h;
      vl[i] = b - h;
    }
  };
  /** (gh, gl) += Aᵀv (double-double), v given by its halves in vh, vl plus a low part vlo. */
  const dots = (gh: Float64Array, gl: Float64Array, vlo: Float64Array | null): void => {
    let vloPtr = 0;
    if (ws && vlo) {
      if (!ws.holds(vlo)) {
        comp.set(vlo);
        vlo = comp;
      }
      vloPtr = vlo.byteOffset;
    }
    for (let j = 0; j < p; j++) {
      if (ws) {
        const c = load(j);
        ws.k.dot2(c.ptr, c.loPtr, c.scale, vh.byteOffset, vl.byteOffset, n, 0, out!.byteOffset, vloPtr);
        dd.hi = out![0]!;
        dd.lo = out![1]!;
      } else dot2(A, j, vh, vl, n, 0, dd, vlo);
      const t = gh[j]! + dd.hi;
      const bb = t - gh[j]!;
      gl[j]! += gh[j]! - (t - bb) + (dd.hi - bb) + dd.lo;
      gh[j] = t;
    }
  };
  /** (s, comp) = b − A·(xh + xl), compensated. */
  const residual = (xh: Float64Array, xl: Float64Array): void => {
    s.set(bHi);
    if (bLo) comp.set(bLo);
    else comp.fill(0);
    for (let j = 0; j < p; j++) {
      if (ws) {
        const c = load(j);
        ws.k.axpy2(c.ptr, c.loPtr, c.scale, -xh[j]!, -xl[j]!, s.byteOffset, comp.byteOffset, n);
      } else axpy2(A, j, -xh[j]!, -xl[j]!, s, comp, n);
    }
  };
  const finish = <T>(v: T): T => {
    if (ws) ws.release(mark);
    return v;
  };

  // c = Aᵀb (double-double): one compensated pass (the low parts of b, 2^-53 smaller, in working precision).
  const cHi = new Float64Array(p);
  const cLo = new Float64Array(p);
  split(bHi);
  dots(cHi, cLo, bLo);

  // Parameter-space refinement: x ← x + R⁻¹R⁻ᵀ(c − G̃x), x as xh + xl.
  const xh = new Float64Array(p);
  const xl = new Float64Array(p);
  const d = new Float64Array(p);
  const rule = new StopRule();
  let steps = 0;
  let converged = false;
  for (let step = 0; step < 12; step++) {
    gramResidual(gram, p, cHi, cLo, xh, xl, d);
    qr.solveRt(p, d);
    qr.solveR(p, d);
    let nd = 0;
    let nx = 0;
    for (let i = 0; i < p; i++) {
      nd = Math.max(nd, Math.abs(d[i]!));
      nx = Math.max(nx, Math.abs(xh[i]!));
    }
    // The engine's stopping rule (refine.ts) with the attainable level: the remaining iteration
    // error, at most √p·(correction) in 2-norm, stays below level·‖x‖₂/2.
    const verdict = rule.judge(nd, (0.5 * level * nx) / Math.sqrt(p));
    if (verdict === "reject") break;
    for (let i = 0; i < p; i++) {
      const s = xh[i]! + d[i]!;
      const bb = s - xh[i]!;
      xl[i]! += xh[i]! - (s - bb) + (d[i]! - bb);
      xh[i] = s;
    }
    steps = step + 1;
    if (verdict !== "continue") {
      // (a first correction cannot show convergence: it is the solution itself)
      converged = verdict === "converged" && step > 0;
      break;
    }
  }
  if (!converged) return finish(null);
  // Normalize x and check that a correction below the attainable level was reached.
  let x2 = 0;
  for (let i = 0; i < p; i++) {
    const s = xh[i]! + xl[i]!;
    xl[i] = xl[i]! - (s - xh[i]!);
    xh[i] = s;
    x2 += s * s;
  }
  const nx = Math.sqrt(x2) * (1 + 2 * p * EPS); // ‖x‖₂, rounded up

  const u = EPS / 2;
  // ‖A‖₂ ≤ ‖A‖_F = √(Σ‖a_j‖²) = √(trace G), rounded up.
  let tr = 0;
  for (let j = 0; j < p; j++) tr += gram.hi[j * p + j]!;
  const sp = Math.sqrt(tr * (1 + 2 * p * EPS) + bound);
  // The residual r = b − A x, compensated, and its 2-norm.
  const takeResidual = (): { r: Float64Array; rn: number } => {
    residual(xh, xl);
    const r = new Float64Array(n);
    let rr = 0;
    for (let i = 0; i < n; i++) {
      const v = s[i]! + comp[i]!;
      r[i] = v;
      rr += v * v;
    }
    return { r, rn: Math.sqrt(rr) };
  };
  // Accept when the residual's error, ‖A‖₂·(error of x) ≤ sp·xErr with xErr ≥ ‖δx‖₂ = ‖G⁻¹δG x‖₂
  // ≤ level·‖x‖₂, is within one unit of roundoff of ‖r‖ (+ the compensated pass's own ε²-level
  // rounding, u²·‖A‖·‖x‖).
  let res = takeResidual();
  let xErr = 1.5 * level * nx + u * u * sp * nx;
  if (sp * xErr <= EPS * res.rn) return finish({ qr, gram, factor, x: Float64Array.from(xh), r: res.r, steps });

  // Otherwise one correction with the true residual (corrected seminormal equations): g = Aᵀr in
  // compensated arithmetic, x ← x + R⁻¹R⁻ᵀg. It contracts x's error — at most level·‖x‖ from the
  // Gram matrix's bound — by ρ = ‖I − (RᵀR)⁻¹AᵀA‖ ≤ (Cholesky's p(p+1)u·2 + β)/σ_min², so the
  // coefficients no longer depend on the Gram matrix's rounding to first order.
  const gh = new Float64Array(p);
  const gl = new Float64Array(p);
  split(s);
  dots(gh, gl, comp);
  let ng = 0;
  for (let i = 0; i < p; i++) {
    d[i] = gh[i]! + gl[i]!;
    ng = Math.max(ng, Math.abs(d[i]!));
  }
  qr.solveRt(p, d);
  qr.solveR(p, d);
  for (let i = 0; i < p; i++) {
    const t = xh[i]! + d[i]!;
    const bb = t - xh[i]!;
    const e = xl[i]! + (xh[i]! - (t - bb) + (d[i]! - bb));
    xh[i] = t + e;
    xl[i] = e - (xh[i]! - t);
  }
  const rn0 = res.rn;
  res = takeResidual();
  // Error of x after the correction: ρ·(level·‖x‖) + ‖(RᵀR)⁻¹‖·(rounding of g: u·‖g‖₂ ≤ u·√p·max|g|,
  // plus the compensated dot products' n²u²·‖A‖‖r‖).
  const rho = (2 * p * (p + 1) * u + bound) / (sigmaMin * sigmaMin);
  xErr = rho * 1.5 * level * nx + (u * Math.sqrt(p) * ng + n * n * u * u * sp * rn0) / (sigmaMin * sigmaMin) + u * u * sp * nx;
  finish(null);
  if (!(rho < 0.5 && sp * xErr <= EPS * res.rn)) return null;
  return { qr, gram, factor, x: Float64Array.from(xh), r: res.r, steps: steps + 1 };
}
