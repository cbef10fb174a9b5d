/**
 * Calibration: reading an unknown sample back from the fitted curve (inverse prediction) and the
 * detection and quantitation limits of a straight-line calibration.
 *
 * ## Inverse prediction (`inverse`)
 * The model is the fitted curve f(x) = Σ b_j x^j (a straight line, with or without intercept, or a
 * polynomial) in a single x. A reading ȳ₀ (the mean of k replicate readings) is read back as the x̂
 * with f(x̂) = ȳ₀:
 * - straight line: x̂ = (ȳ₀ − a)/b;
 * - polynomial: the root inside the calibrated x range [min x, max x] (none, or two or more, is
 *   #N/A with the reason).
 *
 * Its standard uncertainty is the first-order (delta-method) combination of the reading's own
 * scatter and the curve's (ISO 8466-1; ISO/TS 28037:2010 clause 11):
 *
 *     u(x̂)² = ( s_r²/k + Var f(x̂) ) / f′(x̂)²
 *
 * with s_r² = σ̂² (the residual variance; a reading counts as weight 1) for relative weights, or
 * u_r² (the reading's stated standard uncertainty) with known uncertainties; Var f(x) = zᵀ C z from
 * the fit's refined covariance. For the straight line with an intercept this is the textbook
 * s_x₀ = (s/b)·√(1/k + 1/n + (ȳ₀ − ȳ)²/(b²·Σ(x − x̄)²)).
 *
 * The limits invert the prediction band (Fieller's theorem): the x with
 *
 *     (f(x) − ȳ₀)² ≤ q² · ( s_r²/k + Var f(x) )
 *
 * (q the two-sided t quantile with n − rank degrees of freedom, or the normal quantile with known
 * uncertainties). For the straight line this is a quadratic in x, solved in closed form; it is a
 * bounded interval only when the slope is significant at that level (b² > q²·Var b), else #N/A.
 * For a polynomial, the interval around x̂ is found by stepping outward and bisecting.
 *
 * ## Detection and quantitation limits (`detectionLimits`)
 * Straight-line calibrations with an intercept and equal scatter (unweighted) only.
 * - Calibration-line method, DIN 32645:2008 / ISO 11843-2 (the default), with s_x₀ = s/b,
 *   f = n − 2, Q_x = Σ(x − x̄)², m measurements of the sample:
 *     decision limit  x_C = s_x₀ · t(f, 1−α) · √(1/m + 1/n + x̄²/Q_x)
 *     detection limit x_D = s_x₀ · (t(f, 1−α) + t(f, 1−β)) · √(1/m + 1/n + x̄²/Q_x)
 *     quantitation    x_Q = k · s_x₀ · t(f, 1−α/2) · √(1/m + 1/n + (x_Q − x̄)²/Q_x)  (solved exactly)
 *     critical response y_C = a + b·x_C
 * - ICH Q2(R1) convention: LOD = 3.3·s/b, LOQ = 10·s/b with s the residual standard deviation.
 */
import { notAvailable, type Quantity } from "./errors";
import { tQuantile } from "./distributions";
import { critical, errorScale, finiteOr } from "./inference";
import { scaleByPow2 } from "./scale";
import type { LeastSquaresFit } from "./fit";

export interface InverseOptions {
  /** Confidence level for the limits, in (0, 1). */
  readonly level: number;
  /** Number of replicate readings averaged into each reading (≥ 1). */
  readonly replicates: number;
  /** Standard uncertainty of one reading (known-uncertainty fits); null when not given. */
  readonly readingUncertainty: number | null;
}

export interface InverseRow {
  x: Quantity;
  u: Quantity;
  lower: Quantity;
  upper: Quantity;
  /** The reading lies outside the range of fitted responses (an extrapolation). */
  outside: boolean;
}

/** The calibration curve of a single-x fit: coefficients by power, the x range, its variance. */
interface Curve {
  /** c[e] multiplies x^e (e = 0 … d); c[0] = 0 without an intercept. */
  c: number[];
  d: number;
  xmin: number;
  xmax: number;
  /** Var f(x) in user units. */
  variance(x: number): number;
  /** σ² for a reading of weight 1, or null with known uncertainties. */
  sigma2: number | null;
}

/** Why a fit cannot be used as a calibration curve, or null. */
export function curveProblem(fit: LeastSquaresFit): string | null {
  if (fit.shape.k !== 1) return "reading back needs a calibration with a single x column";
  if (fit.rank < fit.parameters) return "some coefficients of the calibration cannot be estimated (LSQ.CHECK explains), so it cannot be read back";
  if (fit.n === 0) return "no rows could be used";
  return null;
}

function curveOf(fit: LeastSquaresFit): Curve | string {
  const why = curveProblem(fit);
  if (why) return why;
  const d = fit.shape.degree;
  const b = fit.coefficients();
  const c = new Array<number>(d + 1).fill(0);
  const off = fit.spec.intercept ? 1 : 0;
  if (fit.spec.intercept) c[0] = b[0]!;
  for (let e = 1; e <= d; e++) c[e] = b[off + e - 1]!;
  let xmin = Infinity;
  let xmax = -Infinity;
  for (const i of fit.used) {
    xmin = Math.min(xmin, fit.spec.x[i]!);
    xmax = Math.max(xmax, fit.spec.x[i]!);
  }
  const sc = errorScale(fit);
  if ("na" in sc) return sc.na;
  const p = fit.parameters;
  const row = new Float64Array(p);
  const sg = scaleByPow2(sc.s, sc.e);
  const variance = (x: number): number => {
    fit.problem.designRow([x], 1, 0, row);
    return sg * sg * fit.hatOfNewRow(row);
  };
  const sigma2 = fit.spec.varianceKnown ? null : sg * sg;
  return { c, d, xmin, xmax, variance, sigma2 };
}

/** f(x) and f′(x) by Horner's rule. */
function evalCurve(c: number[], x: number): { f: number; df: number } {
  let f = 0;
  let df = 0;
  for (let e = c.length - 1; e >= 0; e--) {
    df = df * x + f;
    f = f * x + c[e]!;
  }
  return { f, df };
}

/** The roots of f(x) = y0 in [lo, hi]: sign changes on a fine grid, each bisected to full precision. */
function rootsIn(c: number[], y0: number, lo: number, hi: number): number[] {
  const g = (x: number): number => evalCurve(c, x).f - y0;
  const N = 4096;
  const roots: number[] = [];
  let x0 = lo;
  let g0 = g(x0);
  if (g0 === 0) roots.push(x0);
  for (let s = 1; s <= N; s++) {
    const x1 = s === N ? hi : lo + ((hi - lo) * s) / N;
    const g1 = g(x1);
    if (g1 === 0) roots.push(x1);
    else if (g0 !== 0 && g0 < 0 !== g1 < 0) roots.push(bisect(g, x0, x1, g0));
    x0 = x1;
    g0 = g1;
  }
  return roots;
}

/** A root of g in [a, b] where g(a) = ga and g(b) have opposite signs, to the last bit. */
function bisect(g: (x: number) => number, a: number, b: number, ga: number): number {
  for (let it = 0; it < 200; it++) {
    const mid = 0.5 * (a + b);
    if (mid === a || mid === b) break;
    const gm = g(mid);
    if (gm === 0) return mid;
    if (gm < 0 === ga < 0) {
      a = mid;
      ga = gm;
    } else b = mid;
  }
  return 0.5 * (a + b);
}

/** Read each value of `readings` back through the calibration curve (module comment). */
export function inverse(fit: LeastSquaresFit, readings: Float64Array, opts: InverseOptions): InverseRow[] {
  const curve = curveOf(fit);
  if (typeof curve === "string") {
    const na = notAvailable(curve);
    return Array.from(readings, () => ({ x: na, u: na, lower: na, upper: na, outside: false }));
  }
  const { c, d, xmin, xmax } = curve;
  const k = opts.replicates;
  // The reading's own variance (of the mean of k readings).
  let readVar: Quantity;
  if (curve.sigma2 !== null) readVar = curve.sigma2 / k;
  else if (opts.readingUncertainty !== null) readVar = (opts.readingUncertainty * opts.readingUncertainty) / k;
  else readVar = notAvailable("with standard uncertainties as weights, give the reading's own standard uncertainty (the ureading argument) to get its uncertainty and limits");
  const q = critical(fit, opts.level);
  const fmin = Math.min(evalCurve(c, xmin).f, evalCurve(c, xmax).f);
  const fmax = Math.max(evalCurve(c, xmin).f, evalCurve(c, xmax).f);
  return Array.from(readings, (y0): InverseRow => {
    if (!Number.isFinite(y0)) {
      const na = notAvailable("this reading is empty or not a number");
      return { x: na, u: na, lower: na, upper: na, outside: false };
    }
    let xh: number;
    if (d === 1) {
      if (c[1] === 0) {
        const na = notAvailable("the calibration line is flat (slope 0), so no x gives this reading");
        return { x: na, u: na, lower: na, upper: na, outside: false };
      }
      xh = (y0 - c[0]!) / c[1]!;
    } else {
      const roots = rootsIn(c, y0, xmin, xmax);
      if (roots.length !== 1) {
        const na = notAvailable(
          roots.length === 0
            ? `no x in the calibrated range (${fmt(xmin)} to ${fmt(xmax)}) gives this reading on the fitted curve; the reading is outside what the standards cover`
            : `the fitted curve gives this reading at ${roots.length} places in the calibrated range (near ${roots.slice(0, 3).map(fmt).join(" and ")}); narrow the range of standards or use a lower degree`,
        );
        return { x: na, u: na, lower: na, upper: na, outside: roots.length === 0 };
      }
      xh = roots[0]!;
    }
    const outside = xh < xmin || xh > xmax || (d === 1 && (y0 < fmin || y0 > fmax));
    const x = finiteOr(xh, "the value read back is too large to represent");
    const slope = evalCurve(c, xh).df;
    if (typeof readVar !== "number") return { x, u: readVar, lower: readVar, upper: readVar, outside };
    const fv = curve.variance(xh);
    const u = slope === 0 ? notAvailable("the curve is flat at this reading, so the reading does not determine x") : finiteOr(Math.sqrt(readVar + fv) / Math.abs(slope), "the uncertainty is too large to represent");
    if (typeof q !== "number") return { x, u, lower: q, upper: q, outside };
    const lim = d === 1 ? lineLimits(fit, c, y0, readVar, q) : curveLimits(curve, xh, y0, readVar, q);
    return { x, u, lower: lim.lower, upper: lim.upper, outside };
  });
}

function fmt(v: number): string {
  return Number(v.toPrecision(6)).toString();
}

/**
 * Fieller limits for a straight line: the roots of
 *   (b² − q²·c11)·x² + 2·(b·(a − y0) − q²·c01)·x + (a − y0)² − q²·(s_r² + c00) = 0
 * with c the covariance of (a, b) in user units (c00 = c01 = 0 without an intercept).
 */
function lineLimits(fit: LeastSquaresFit, c: number[], y0: number, readVar: number, q: number): { lower: Quantity; upper: Quantity } {
  const cov = fit.covariance();
  const i1 = fit.spec.intercept ? 1 : 0;
  const num = (v: Quantity): number => (typeof v === "number" ? v : NaN);
  const c11 = num(cov[i1]![i1]!);
  const c00 = fit.spec.intercept ? num(cov[0]![0]!) : 0;
  const c01 = fit.spec.intercept ? num(cov[0]![1]!) : 0;
  const a = c[0]!;
  const b = c[1]!;
  const q2 = q * q;
  const A = b * b - q2 * c11;
  if (!(A > 0)) {
    const na = notAvailable(`the slope is not significant enough at this level to bound x (|slope|/standard error = ${fmt(Math.abs(b) / Math.sqrt(c11))}, needs more than ${fmt(q)}); the limits are unbounded`);
    return { lower: na, upper: na };
  }
  const e = a - y0;
  const B = b * e - q2 * c01; // half the linear coefficient
  const C0 = e * e - q2 * (readVar + c00);
  const disc = B * B - A * C0;
  if (!(disc >= 0)) {
    const na = notAvailable("the prediction band does not contain this reading");
    return { lower: na, upper: na };
  }
  // stable roots of A x² + 2B x + C0 = 0
  const s = Math.sqrt(disc);
  const t = -B + (B >= 0 ? -s : s);
  const r1 = t / A;
  const r2 = t !== 0 ? C0 / t : -r1;
  return { lower: finiteOr(Math.min(r1, r2), "the limit is too large to represent"), upper: finiteOr(Math.max(r1, r2), "the limit is too large to represent") };
}

/** Limits for a polynomial: the interval around x̂ where the band inequality holds, by stepping and bisection. */
function curveLimits(curve: Curve, xh: number, y0: number, readVar: number, q: number): { lower: Quantity; upper: Quantity } {
  const { c, xmin, xmax } = curve;
  const q2 = q * q;
  const g = (x: number): number => {
    const f = evalCurve(c, x).f - y0;
    return f * f - q2 * (readVar + curve.variance(x));
  };
  const width = xmax - xmin;
  const h = width / 1024;
  const far = width; // search up to one range width beyond the standards
  const side = (dir: 1 | -1): Quantity => {
    let a = xh;
    let ga = g(a);
    for (let s = 1; ; s++) {
      const x = xh + dir * s * h;
      if (x < xmin - far || x > xmax + far) return notAvailable("the prediction band does not close within one calibration range of the standards at this level (the curve is too flat or too uncertain there)");
      const gx = g(x);
      if (gx >= 0) return finiteOr(gx === 0 ? x : bisect(g, a, x, ga), "the limit is too large to represent");
      a = x;
      ga = gx;
    }
  };
  return { lower: side(-1), upper: side(1) };
}

export interface LimitsOptions {
  /** "calibration": DIN 32645 / ISO 11843-2 calibration-line method; "ich": ICH Q2 3.3·s/b and 10·s/b. */
  readonly method: "calibration" | "ich";
  readonly alpha: number;
  readonly beta: number;
  /** Quantitation factor k (1/relative uncertainty at the quantitation limit). */
  readonly k: number;
  /** Measurements of the sample (m). */
  readonly samples: number;
}

export interface DetectionLimits {
  decision: Quantity;
  detection: Quantity;
  quantitation: Quantity;
  criticalResponse: Quantity;
}

/** Why a fit cannot give detection limits, or null. */
export function limitsProblem(fit: LeastSquaresFit): string | null {
  if (fit.shape.k !== 1 || fit.shape.degree !== 1) return "detection limits are defined here for straight-line calibrations only (one x column, degree 1)";
  if (!fit.spec.intercept) return "the calibration-line method needs an intercept (the blank's signal); fit with intercept TRUE";
  if (fit.spec.weights) return "the calibration-line method assumes the same scatter at every level; this calibration is weighted";
  if (fit.rank < 2) return "the slope of the calibration cannot be estimated";
  if (fit.residualDf < 1) return "the calibration needs at least three usable standards to estimate its scatter";
  return null;
}

export function detectionLimits(fit: LeastSquaresFit, o: LimitsOptions): DetectionLimits {
  const why = limitsProblem(fit);
  if (why) {
    const na = notAvailable(why);
    return { decision: na, detection: na, quantitation: na, criticalResponse: na };
  }
  const b = fit.coefficients();
  const a = b[0]!;
  const slope = Math.abs(b[1]!);
  const st = fit.statistics();
  const s = typeof st.sigma === "number" ? st.sigma : NaN;
  if (!(slope > 0)) {
    const na = notAvailable("the calibration line is flat (slope 0)");
    return { decision: na, detection: na, quantitation: na, criticalResponse: na };
  }
  if (!(s > 0)) {
    const na = notAvailable("the calibration has no scatter (an exact fit), so no limit can be derived from it");
    return { decision: na, detection: na, quantitation: na, criticalResponse: na };
  }
  const sx0 = s / slope;
  if (o.method === "ich") {
    const na = notAvailable("not part of the ICH Q2 convention (use the calibration-line method)");
    return { decision: na, detection: finiteOr(3.3 * sx0, "too large to represent"), quantitation: finiteOr(10 * sx0, "too large to represent"), criticalResponse: na };
  }
  const n = fit.n;
  const f = n - 2;
  let xbar = 0;
  for (const i of fit.used) xbar += fit.spec.x[i]!;
  xbar /= n;
  let Qx = 0;
  for (const i of fit.used) Qx += (fit.spec.x[i]! - xbar) ** 2;
  const m = o.samples;
  const root = Math.sqrt(1 / m + 1 / n + (xbar * xbar) / Qx);
  const tA = tQuantile(1 - o.alpha, f);
  const tB = tQuantile(1 - o.beta, f);
  const tQ = tQuantile(1 - o.alpha / 2, f);
  const decision = sx0 * tA * root;
  const detection = sx0 * (tA + tB) * root;
  // x² = K²·(1/m + 1/n + (x − x̄)²/Q_x), K = k·s_x0·t(f, 1 − α/2): the positive root.
  const K2 = (o.k * sx0 * tQ) ** 2;
  const A = 1 - K2 / Qx;
  const B = (K2 * xbar) / Qx; // half the linear coefficient
  const C0 = -K2 * (1 / m + 1 / n + (xbar * xbar) / Qx);
  let quant: Quantity;
  if (!(A > 0)) quant = notAvailable("the calibration is too uncertain for this quantitation factor: no concentration reaches the required relative uncertainty");
  else {
    const disc = B * B - A * C0;
    const sq = Math.sqrt(disc);
    // positive root of A x² + 2B x + C0 = 0 (C0 < 0 < A, so exactly one), stable form
    quant = finiteOr(B > 0 ? -C0 / (B + sq) : (sq - B) / A, "too large to represent");
  }
  return {
    decision: finiteOr(decision, "too large to represent"),
    detection: finiteOr(detection, "too large to represent"),
    quantitation: quant,
    criticalResponse: finiteOr(a + Math.sign(b[1]!) * slope * decision, "too large to represent"),
  };
}
