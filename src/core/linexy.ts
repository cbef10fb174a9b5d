/**
 * A straight line y = a + b·x when both x and y carry known standard uncertainties: generalized
 * distance regression (ISO/TS 28037:2010 clause 7), computed by York's method (York 1966; York,
 * Evensen, Martínez & De Basabe Delgado, Am. J. Phys. 72 (2004) 367), which minimizes
 *
 *     S(a, b) = Σ_i W_i (y_i − a − b·x_i)²,   W_i = 1 / (u_y,i² + b²·u_x,i² − 2·b·r_i·u_x,i·u_y,i)
 *
 * (r_i the correlation of the two errors of row i). Deming regression (constant u_x and u_y) and
 * orthogonal regression (equal constant uncertainties) are special cases; with every u_x = 0 it is
 * the weighted least-squares line with weights 1/u_y².
 *
 * ## Iteration
 * The slope solves b = F(b), York's update: with W_i at b, the weighted means X̄, Ȳ, U_i = x_i − X̄,
 * V_i = y_i − Ȳ and β_i = W_i·(U_i·u_y² + b·V_i·u_x² − (b·U_i + V_i)·r·u_x·u_y),
 * F(b) = Σ W_i β_i V_i / Σ W_i β_i U_i. The first steps are plain fixed-point steps; then the
 * secant method on g(b) = F(b) − b (safeguarded: a secant step that does not reduce |g| is
 * replaced by a fixed-point step). It stops when a step changes b by at most
 * LINEXY_STEP·ε·(|b| + u(b)) (tolerances.ts) — the rounding level of the data's own sums —
 * and gives up after LINEXY_MAX_STEPS (#N/A: no convergence, e.g. nearly vertical data).
 *
 * ## Uncertainty evaluation
 * York (2004), eqs. 13–15, with the adjusted points x_adj,i = X̄ + β_i, their weighted mean x̄ and
 * u_i = x_adj,i − x̄:  u(b)² = 1/Σ W_i u_i²,  u(a)² = 1/Σ W_i + x̄²·u(b)²,  cov(a, b) = −x̄·u(b)².
 * This equals the inverse of JᵀJ for the full Jacobian of the weighted distances (the evaluation of
 * ISO/TS 28037 clause 7, matching its example to the printed digits); evaluations that drop the
 * dependence of W_i on b give u(a) about 1 % smaller on that example. The uncertainties are the
 * stated ones propagated, not rescaled by the scatter; limits use the normal distribution, and
 * χ² = S_min with n − 2 degrees of freedom tests whether the stated uncertainties explain the
 * scatter.
 */
import { notAvailable, type Quantity } from "./errors";
import { chiSquareUpper, normalQuantile } from "./distributions";
import { EPS, LINEXY_MAX_STEPS, LINEXY_STEP } from "./tolerances";
import { LsqError } from "./errors";

export interface LineXYInput {
  readonly x: Float64Array;
  readonly y: Float64Array;
  /** Standard uncertainties (NaN: missing, the row is skipped). */
  readonly ux: Float64Array;
  readonly uy: Float64Array;
  /** Correlation of the two errors of each row (NaN: missing). */
  readonly r: Float64Array;
}

export interface LineXY {
  intercept: Quantity;
  slope: Quantity;
  uIntercept: Quantity;
  uSlope: Quantity;
  covariance: Quantity;
  chi2: Quantity;
  df: number;
  p: Quantity;
  iterations: number;
  used: number;
  skipped: number;
  /** Input rows used (0-based). */
  rows: Int32Array;
  /** Median of |b|·u_x / u_y over the used rows (how much the x uncertainties matter). */
  xShare: Quantity;
}

/** Compensated sum (Neumaier). */
function csum(v: ArrayLike<number>, n: number, f: (i: number) => number = (i) => v[i]!): number {
  let s = 0;
  let c = 0;
  for (let i = 0; i < n; i++) {
    const t = f(i);
    const u = s + t;
    c += Math.abs(s) >= Math.abs(t) ? s - u + t : t - u + s;
    s = u;
  }
  return s + c;
}

export function lineXY(inp: LineXYInput): LineXY {
  const m = inp.x.length;
  const rows: number[] = [];
  for (let i = 0; i < m; i++) {
    const vals = [inp.x[i]!, inp.y[i]!, inp.ux[i]!, inp.uy[i]!, inp.r[i]!];
    if (vals.some((v) => Number.isNaN(v))) continue;
    if (vals.some((v) => !Number.isFinite(v))) throw new LsqError("range", `row ${i + 1} holds an infinite value`);
    if (inp.ux[i]! < 0 || inp.uy[i]! < 0) throw new LsqError("range", `the ${inp.ux[i]! < 0 ? "x" : "y"} uncertainty in row ${i + 1} is negative; standard uncertainties must be zero or positive`);
    if (inp.ux[i] === 0 && inp.uy[i] === 0) throw new LsqError("range", `row ${i + 1} has zero uncertainty in both x and y, so it cannot be weighted; give at least one of them a positive uncertainty`);
    if (Math.abs(inp.r[i]!) > 1) throw new LsqError("range", `the correlation in row ${i + 1} is ${inp.r[i]}; a correlation lies between −1 and 1`);
    rows.push(i);
  }
  const n = rows.length;
  const idx = Int32Array.from(rows);
  const base = { used: n, skipped: m - n, rows: idx, df: Math.max(0, n - 2) };
  const fail = (why: string, iterations = 0): LineXY => {
    const na = notAvailable(why);
    return { ...base, intercept: na, slope: na, uIntercept: na, uSlope: na, covariance: na, chi2: na, p: na, iterations, xShare: na };
  };
  if (n < 2) return fail(`only ${n} usable row${n === 1 ? "" : "s"}; a line needs at least two`);
  const x = Float64Array.from(idx, (i) => inp.x[i]!);
  const y = Float64Array.from(idx, (i) => inp.y[i]!);
  const vx = Float64Array.from(idx, (i) => inp.ux[i]! * inp.ux[i]!);
  const vy = Float64Array.from(idx, (i) => inp.uy[i]! * inp.uy[i]!);
  const cxy = Float64Array.from(idx, (i) => inp.r[i]! * inp.ux[i]! * inp.uy[i]!);
  const xmin = Math.min(...x);
  if (Math.max(...x) === xmin) return fail("every used row has the same x, so the line's slope is not defined");

  const W = new Float64Array(n);
  const U = new Float64Array(n);
  const V = new Float64Array(n);
  const B = new Float64Array(n);
  /** York's quantities at slope b; null when some W_i is not positive and finite. */
  const at = (b: number): { F: number; X: number; Y: number; sw: number } | null => {
    for (let i = 0; i < n; i++) {
      const d = vy[i]! + b * b * vx[i]! - 2 * b * cxy[i]!;
      if (!(d > 0) || !Number.isFinite(d)) return null;
      W[i] = 1 / d;
    }
    const sw = csum(W, n);
    const X = csum(W, n, (i) => W[i]! * x[i]!) / sw;
    const Y = csum(W, n, (i) => W[i]! * y[i]!) / sw;
    for (let i = 0; i < n; i++) {
      U[i] = x[i]! - X;
      V[i] = y[i]! - Y;
      B[i] = W[i]! * (U[i]! * vy[i]! + b * V[i]! * vx[i]! - (b * U[i]! + V[i]!) * cxy[i]!);
    }
    const num = csum(W, n, (i) => W[i]! * B[i]! * V[i]!);
    const den = csum(W, n, (i) => W[i]! * B[i]! * U[i]!);
    return { F: num / den, X, Y, sw };
  };

  // Starting slope: the line with weights 1/u_y² (or unweighted where some u_y is zero).
  let b: number;
  {
    const w = Float64Array.from(vy, (v) => (v > 0 ? 1 / v : 1));
    const sw = csum(w, n);
    const X = csum(w, n, (i) => w[i]! * x[i]!) / sw;
    const Y = csum(w, n, (i) => w[i]! * y[i]!) / sw;
    b = csum(w, n, (i) => w[i]! * (x[i]! - X) * (y[i]! - Y)) / csum(w, n, (i) => w[i]! * (x[i]! - X) ** 2);
  }
  if (!Number.isFinite(b)) return fail("the starting line could not be computed (the x values do not vary enough)");
  let cur = at(b);
  if (!cur) return fail("the uncertainties and their correlation leave a row with no weight along the starting line");
  let g = cur.F - b;
  let prevB = NaN;
  let prevG = NaN;
  let steps = 0;
  let converged = false;
  let ub = Infinity;
  for (steps = 1; steps <= LINEXY_MAX_STEPS; steps++) {
    // secant on g(b) = F(b) − b once two points are known, else a fixed-point step
    let next = cur.F;
    if (steps > 2 && Number.isFinite(prevG) && g !== prevG) {
      const s = b - (g * (b - prevB)) / (g - prevG);
      if (Number.isFinite(s)) next = s;
    }
    let nx = at(next);
    if (nx && Math.abs(nx.F - next) > Math.abs(g) && next !== cur.F) {
      next = cur.F; // the secant step did not help: a fixed-point step instead
      nx = at(next);
    }
    if (!nx || !Number.isFinite(next)) return fail("the iteration left the range where every row has a weight (the data may be nearly vertical, or the uncertainties inconsistent)", steps);
    const step = Math.abs(next - b);
    prevB = b;
    prevG = g;
    b = next;
    cur = nx;
    g = cur.F - b;
    // u(b) at the current slope for the stopping level
    const su = csum(W, n, (i) => {
      const xa = cur!.X + B[i]!;
      return W[i]! * xa;
    }) / cur.sw;
    const sub = csum(W, n, (i) => W[i]! * (cur!.X + B[i]! - su) ** 2);
    ub = 1 / Math.sqrt(sub);
    if (step <= LINEXY_STEP * EPS * (Math.abs(b) + (Number.isFinite(ub) ? ub : 0))) {
      converged = true;
      break;
    }
  }
  if (!converged) return fail(`the iteration did not settle within ${LINEXY_MAX_STEPS} steps (the data may be nearly vertical, or the line poorly determined)`, LINEXY_MAX_STEPS);
  // Final quantities at the converged slope (W, B are those of `cur`, evaluated at b).
  const fin = at(b)!;
  const a = fin.Y - b * fin.X;
  const xbar = csum(W, n, (i) => W[i]! * (fin.X + B[i]!)) / fin.sw;
  const sumWu2 = csum(W, n, (i) => W[i]! * (fin.X + B[i]! - xbar) ** 2);
  const vb = 1 / sumWu2;
  const va = 1 / fin.sw + xbar * xbar * vb;
  const S = csum(W, n, (i) => W[i]! * (y[i]! - b * x[i]! - a) ** 2);
  const ratios = Array.from(idx, (_i, t) => (vy[t]! > 0 ? (Math.abs(b) * Math.sqrt(vx[t]!)) / Math.sqrt(vy[t]!) : Infinity)).sort((p, q) => p - q);
  const med = ratios.length % 2 ? ratios[ratios.length >> 1]! : 0.5 * (ratios[(ratios.length >> 1) - 1]! + ratios[ratios.length >> 1]!);
  const df = n - 2;
  const fin2 = (v: number, what: string): Quantity => (Number.isFinite(v) ? v : notAvailable(`the ${what} is too large to represent`));
  return {
    ...base,
    intercept: fin2(a, "intercept"),
    slope: fin2(b, "slope"),
    uIntercept: fin2(Math.sqrt(va), "uncertainty of the intercept"),
    uSlope: fin2(Math.sqrt(vb), "uncertainty of the slope"),
    covariance: fin2(-xbar * vb, "covariance"),
    chi2: fin2(S, "χ²"),
    p: df > 0 ? chiSquareUpper(S, df) : notAvailable("with two rows the line passes through both points; χ² has no degrees of freedom to test"),
    iterations: steps,
    xShare: Number.isFinite(med) ? med : notAvailable("some rows have no y uncertainty"),
  };
}

/** Limits a ± q·u at `level` with the normal quantile q (the uncertainties are stated, not estimated). */
export function normalLimits(v: Quantity, u: Quantity, level: number): { lower: Quantity; upper: Quantity } {
  if (typeof v !== "number") return { lower: v, upper: v };
  if (typeof u !== "number") return { lower: u, upper: u };
  const q = normalQuantile(0.5 + level / 2);
  return { lower: v - q * u, upper: v + q * u };
}
