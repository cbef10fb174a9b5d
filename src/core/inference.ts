/**
 * Inference from a solved fit: the error scale σ, the fit statistics (STATS), the parameter table
 * with intervals (PARAMS), predictions with their intervals (PREDICT), the per-row influence
 * measures (INFLUENCE) and the χ² goodness of fit for known uncertainties.
 *
 * Two conventions for σ (the scale of the errors):
 * - relative weights (the default): σ is estimated from the residuals, σ̂² = RSS_w / (n − rank);
 *   intervals and tests use Student's t with n − rank degrees of freedom;
 * - known variances (`spec.varianceKnown`, the weights are 1/u² from standard uncertainties u):
 *   σ = 1 exactly, the covariance is (XᵀU⁻²X)⁻¹ without rescaling, and intervals and tests use the
 *   normal distribution (ISO/TS 28037:2010 clause 6; GUM).
 *
 * Every function returns Quantity values: a finite number, or NotAvailable with the reason.
 */
import { notAvailable, type NotAvailable, type Quantity } from "./errors";
import { chiSquareUpper, fUpper, normalQuantile, normalTwoSided, tQuantile, tTwoSided } from "./distributions";
import { scaleByPow2 } from "./scale";
import { quadraticForm, sumSquares } from "./sums";
import { twoProd, type DD } from "./dd";
import { RowStatus } from "./design";
import { leverageOneGap } from "./tolerances";
import type { LeastSquaresFit } from "./fit";

/** Summary statistics; each is a finite number or a reason why it is not available. */
export interface FitStatistics {
  observationsUsed: number;
  observationsSkipped: number;
  zeroWeightRows: number;
  parameters: number;
  rank: number;
  residualDf: number;
  rss: Quantity;
  sigma: Quantity;
  rSquared: Quantity;
  adjRSquared: Quantity;
  fStatistic: Quantity;
  fPValue: Quantity;
  conditionNumber: Quantity;
  logLikelihood: Quantity;
  aic: Quantity;
  bic: Quantity;
  /** True when R² is the centered one (model with intercept). */
  centered: boolean;
  /** True when the fit is exact (tolerances.ts, EXACT_FIT). */
  exact: boolean;
  /** True when y has the same value in every used row (or is zero everywhere without an intercept). */
  constantY: boolean;
}

/** One row of the parameter table. */
export interface ParameterRow {
  estimate: Quantity;
  standardError: Quantity;
  t: Quantity;
  p: Quantity;
  lower: Quantity;
  upper: Quantity;
}

/** Per-row influence measures (rows that are not used are NotAvailable). */
export interface InfluenceRow {
  leverage: Quantity;
  standardized: Quantity;
  studentized: Quantity;
  cooks: Quantity;
}

export interface Prediction {
  value: Quantity;
  /** Standard error of the mean response at the row. */
  seMean: Quantity;
  /** Standard error for a new observation (weight 1) at the row. */
  seNew: Quantity;
  /** Limits at the requested level (when an interval was asked for). */
  lower?: Quantity;
  upper?: Quantity;
}

/** χ² goodness of fit for known uncertainties. */
export interface ChiSquare {
  chi2: Quantity;
  df: Quantity;
  p: Quantity;
  reduced: Quantity;
}

export const NA_SIGMA_DF0 = "the fit has no residual degrees of freedom (as many parameters as used rows), so the scatter of the data cannot be estimated";

/** σ in user units as s·2^e: {s: σ̃, e: −ys} from the residuals, or {s: 1, e: 0} when the variances are known. */
export type ErrorScale = { readonly s: number; readonly e: number } | NotAvailable;

export function finiteOr(v: number, reason: string): Quantity {
  return Number.isFinite(v) ? v : notAvailable(reason);
}

/** σ̃ estimated from the residuals (scaled units), or why not. */
export function sigmaScaled(fit: LeastSquaresFit): Quantity {
  const df = fit.residualDf;
  if (df === 0) return notAvailable(NA_SIGMA_DF0);
  return Math.sqrt(fit.rssScaled / df);
}

/**
 * The error scale used by the covariance, standard errors and intervals — or why those are not
 * available (no residual degrees of freedom, or the covariance refused by its work limit).
 */
export function errorScale(fit: LeastSquaresFit): ErrorScale {
  const refused = fit.covarianceRefused();
  if (refused) return refused;
  if (fit.spec.varianceKnown) return { s: 1, e: 0 };
  const sig = sigmaScaled(fit);
  return typeof sig === "number" ? { s: sig, e: -fit.ys } : sig;
}

/** The two-sided critical value at `level`: t(df) with an estimated σ, normal with known variances. */
export function critical(fit: LeastSquaresFit, level: number): Quantity {
  if (fit.spec.varianceKnown) return normalQuantile(0.5 + level / 2);
  if (fit.residualDf === 0) return notAvailable(NA_SIGMA_DF0);
  return tQuantile(0.5 + level / 2, fit.residualDf);
}

/** Two-sided p-value of a test statistic (t or, with known variances, z). */
export function twoSided(fit: LeastSquaresFit, t: number): number {
  return fit.spec.varianceKnown ? normalTwoSided(t) : tTwoSided(t, fit.residualDf);
}

/**
 * Total sum of squares, scaled by 2^(2ys): Σ w (y − ȳ_w)² with an intercept (centered),
 * Σ w y² without (uncentered), accumulated in compensated arithmetic from the exact ỹ.
 * R² uses 1 − RSS/TSS rather than the sum of squares of the fitted values: RSS is insensitive to
 * first order to the rounding of the coefficients, the fitted values are not.
 */
export function totalSumOfSquaresScaled(fit: LeastSquaresFit): number {
  const { n, yHi, yLo } = fit;
  const sw = fit.problem.sw;
  if (n === 0) return 0;
  const dev = new Float64Array(n);
  if (!fit.spec.intercept) {
    for (let t = 0; t < n; t++) dev[t] = yHi[t]! + (yLo ? yLo[t]! : 0);
    return sumSquares(dev, 0, n);
  }
  if (!sw && !yLo) {
    // Unweighted: ȳ = Σ ỹ / n (compensated sum), deviations ỹ − ȳ.
    let num = 0;
    let numC = 0;
    for (let t = 0; t < n; t++) {
      const v = yHi[t]!;
      const sn = num + v;
      const bb = sn - num;
      numC += num - (sn - bb) + (v - bb);
      num = sn;
    }
    const ybar = (num + numC) / n;
    for (let t = 0; t < n; t++) dev[t] = yHi[t]! - ybar;
    return sumSquares(dev, 0, n);
  }
  // ȳ_w (scaled) = Σ √w·ỹ / Σ w; deviations √w·(y − ȳ_w) = ỹ − √w·ȳ_w.
  let num = 0;
  let numC = 0;
  let den = 0;
  let denC = 0;
  const tmp: DD = { hi: 0, lo: 0 };
  for (let t = 0; t < n; t++) {
    const s = sw ? sw.hi[t]! : 1;
    twoProd(s, yHi[t]!, tmp);
    const e = tmp.lo + s * (yLo ? yLo[t]! : 0) + (sw ? sw.lo[t]! * yHi[t]! : 0);
    let sn = num + tmp.hi;
    let bb = sn - num;
    numC += num - (sn - bb) + (tmp.hi - bb) + e;
    num = sn;
    const w = sw ? fit.spec.weights![fit.used[t]!]! : 1;
    sn = den + w;
    bb = sn - den;
    denC += den - (sn - bb) + (w - bb);
    den = sn;
  }
  const ybar = (num + numC) / (den + denC);
  for (let t = 0; t < n; t++) {
    const s = sw ? sw.hi[t]! : 1;
    twoProd(s, ybar, tmp);
    dev[t] = yHi[t]! - tmp.hi + ((yLo ? yLo[t]! : 0) - tmp.lo - (sw ? sw.lo[t]! * ybar : 0));
  }
  return sumSquares(dev, 0, n);
}

export function computeStatistics(fit: LeastSquaresFit): FitStatistics {
  const n = fit.n;
  const rank = fit.rank;
  const df = fit.residualDf;
  const { skipped, zeroWeight } = fit.rowCounts();
  const centered = fit.spec.intercept;
  const ys = fit.ys;
  const exact = fit.exact;
  const sig = sigmaScaled(fit);
  const rss = n === 0 ? notAvailable("no rows could be used") : finiteOr(scaleByPow2(fit.rssScaled, -2 * ys), "the residual sum of squares is too large to represent");
  const sigma = typeof sig === "number" ? finiteOr(scaleByPow2(sig, -ys), "too large to represent") : sig;

  const tss = totalSumOfSquaresScaled(fit);
  const constantY = n > 0 && tss === 0;
  // Regression sum of squares TSS − RSS (≥ 0 up to rounding).
  const ssrScaled = Math.max(0, tss - fit.rssScaled);
  let rSquared: Quantity;
  let adj: Quantity;
  if (n === 0) rSquared = notAvailable("no rows could be used");
  else if (tss === 0) rSquared = notAvailable(centered ? "y has the same value in every used row, so there is nothing for the model to explain" : "every y value is zero");
  else rSquared = 1 - fit.rssScaled / tss;
  const nc = centered ? n - 1 : n;
  if (typeof rSquared !== "number") adj = rSquared;
  else if (df === 0) adj = notAvailable(NA_SIGMA_DF0);
  else adj = 1 - ((1 - rSquared) * nc) / df;

  const dfReg = rank - (centered ? 1 : 0);
  let F: Quantity;
  if (dfReg <= 0) F = notAvailable("the model has no terms to test beyond the intercept");
  else if (df === 0) F = notAvailable(NA_SIGMA_DF0);
  else if (constantY) F = notAvailable(centered ? "y has the same value in every used row, so there is nothing to test" : "every y value is zero, so there is nothing to test");
  else if (exact) F = notAvailable("the model fits the data exactly (the residuals are zero to within the rounding of the data), so the F statistic is unbounded");
  else F = finiteOr(ssrScaled / dfReg / (fit.rssScaled / df), "the F statistic is too large to represent");
  const Fp: Quantity = typeof F === "number" ? fUpper(F, dfReg, df) : F;

  // Gaussian log-likelihood with the ML variance RSS/n and variances σ²/w_i.
  let logL: Quantity;
  if (n === 0) logL = notAvailable("no rows could be used");
  else if (exact) logL = notAvailable("the model fits the data exactly, so the likelihood is unbounded");
  else {
    let sumLogW = 0;
    const w = fit.spec.weights;
    if (w) for (let t = 0; t < n; t++) sumLogW += Math.log(w[fit.used[t]!]!);
    const lnRss = Math.log(fit.rssScaled) - 2 * ys * Math.LN2;
    logL = -0.5 * n * (Math.log(2 * Math.PI) + lnRss - Math.log(n) + 1) + 0.5 * sumLogW;
  }
  const kParams = rank + 1; // identifiable coefficients plus the error variance
  const aic: Quantity = typeof logL === "number" ? -2 * logL + 2 * kParams : logL;
  const bic: Quantity = typeof logL === "number" ? -2 * logL + Math.log(n) * kParams : logL;

  const cond: Quantity = rank === 0 ? notAvailable("no column could be estimated") : fit.condition().value;

  return {
    observationsUsed: n,
    observationsSkipped: skipped,
    zeroWeightRows: zeroWeight,
    parameters: fit.shape.p,
    rank,
    residualDf: df,
    rss,
    sigma,
    rSquared,
    adjRSquared: adj,
    fStatistic: F,
    fPValue: Fp,
    conditionNumber: cond,
    logLikelihood: logL,
    aic,
    bic,
    centered,
    exact,
    constantY,
  };
}

/** χ² = Σ ((y − fitted)/u)² with n − rank degrees of freedom, for known uncertainties. */
export function chiSquare(fit: LeastSquaresFit): ChiSquare {
  if (!fit.spec.varianceKnown) {
    const na = notAvailable("the weights are relative, not standard uncertainties, so χ² has no reference scale (set the weighting to \"uncertainty\")");
    return { chi2: na, df: na, p: na, reduced: na };
  }
  const df = fit.residualDf;
  const chi2 = finiteOr(scaleByPow2(fit.rssScaled, -2 * fit.ys), "χ² is too large to represent");
  if (df === 0) {
    const na = notAvailable("the fit has no residual degrees of freedom, so χ² cannot be tested");
    return { chi2, df: 0, p: na, reduced: na };
  }
  if (typeof chi2 !== "number") return { chi2, df, p: chi2, reduced: chi2 };
  return { chi2, df, p: chiSquareUpper(chi2, df), reduced: chi2 / df };
}

/** The covariance of the estimates in user units, p × p row-major (NotAvailable for non-identifiable rows/columns). */
export function covarianceTable(fit: LeastSquaresFit, nonIdent: (j: number) => NotAvailable): Quantity[][] {
  const p = fit.shape.p;
  const sc = errorScale(fit);
  const idx = fit.keptIndex();
  const r = fit.rank;
  const C = "na" in sc ? new Float64Array(0) : fit.scaledCovariance();
  const out: Quantity[][] = [];
  for (let i = 0; i < p; i++) {
    const row: Quantity[] = [];
    for (let j = 0; j < p; j++) {
      const ki = idx[i]!;
      const kj = idx[j]!;
      if (ki < 0 || kj < 0) row.push(nonIdent(ki < 0 ? i : j));
      else if ("na" in sc) row.push(sc);
      else row.push(finiteOr(scaleByPow2(sc.s * sc.s * C[kj * r + ki]!, fit.cs[i]! + fit.cs[j]! + 2 * sc.e), "the covariance is too large or too small to represent"));
    }
    out.push(row);
  }
  return out;
}

export function parameterTable(fit: LeastSquaresFit, level: number, nonIdent: (j: number) => NotAvailable): ParameterRow[] {
  const p = fit.shape.p;
  const b = fit.coefficients();
  const idx = fit.keptIndex();
  const sc = errorScale(fit);
  const r = fit.rank;
  const C = r > 0 && !("na" in sc) ? fit.scaledCovariance() : new Float64Array(0);
  const q = critical(fit, level);
  const rows: ParameterRow[] = [];
  for (let j = 0; j < p; j++) {
    const k = idx[j]!;
    if (k < 0) {
      const na = nonIdent(j);
      rows.push({ estimate: na, standardError: na, t: na, p: na, lower: na, upper: na });
      continue;
    }
    const est = finiteOr(b[j]!, "the estimate is too large to represent");
    if ("na" in sc) {
      rows.push({ estimate: est, standardError: sc, t: sc, p: sc, lower: sc, upper: sc });
      continue;
    }
    const se = finiteOr(scaleByPow2(sc.s * Math.sqrt(C[k * r + k]!), fit.cs[j]! + sc.e), "the standard error is too large to represent");
    let t: Quantity;
    let pv: Quantity;
    if (typeof se !== "number" || typeof est !== "number") t = pv = notAvailable("the estimate or its standard error is not available");
    else if (se === 0) t = pv = notAvailable("the standard error is zero (the model fits exactly), so the t statistic is unbounded");
    else {
      t = finiteOr(est / se, "the t statistic is too large to represent");
      pv = typeof t === "number" ? twoSided(fit, t) : t;
    }
    let lower: Quantity = notAvailable("the estimate or its standard error is not available");
    let upper: Quantity = lower;
    if (typeof q !== "number") lower = upper = q;
    else if (typeof se === "number" && typeof est === "number") {
      lower = finiteOr(est - q * se, "the limit is too large to represent");
      upper = finiteOr(est + q * se, "the limit is too large to represent");
    }
    rows.push({ estimate: est, standardError: se, t, p: pv, lower, upper });
  }
  return rows;
}

/**
 * Predictions at new rows of x (q × k column-major, user units, unweighted). The standard error of
 * the mean response is σ·√h with h = zᵀC̃z from the refined covariance (z: the new design row in
 * the scaled units of the fit), in compensated arithmetic; for a new observation (weight 1)
 * σ·√(1 + h). With `interval`, lower and upper limits at `level` (t or normal quantile).
 * A new row that does not follow a dependency found in the data cannot be predicted
 * (`brokenDependency` decides, with the rank decision's tolerance).
 */
export function predictions(
  fit: LeastSquaresFit,
  newx: Float64Array,
  q: number,
  interval: "confidence" | "prediction" | null,
  level: number,
  broken: (row: Float64Array) => NotAvailable | null,
): Prediction[] {
  const { k, p } = fit.shape;
  const b = fit.coefficients();
  const r = fit.rank;
  const sc = errorScale(fit);
  const C = r > 0 && !("na" in sc) ? fit.scaledCovariance() : null;
  const crit = interval ? critical(fit, level) : 0;
  const out: Prediction[] = [];
  const row = new Float64Array(p);
  const kept = fit.factor.kept;
  const bLow = r > 0 ? fit.coefficientsLow() : new Float64Array(p);
  for (let t = 0; t < q; t++) {
    let missing = -1;
    for (let c = 0; c < k; c++) if (!Number.isFinite(newx[c * q + t]!)) missing = c;
    if (missing >= 0) {
      const na = notAvailable(`${k === 1 ? "x" : `column ${missing + 1}`} of this new row is empty or not a number`);
      out.push({ value: na, seMean: na, seNew: na, lower: na, upper: na });
      continue;
    }
    fit.problem.designRow(newx, q, t, row);
    const na = broken(row);
    if (na) {
      out.push({ value: na, seMean: na, seNew: na, lower: na, upper: na });
      continue;
    }
    // value Σ row·(b + δ) in compensated arithmetic (the terms may cancel; δ: the coefficients'
    // low parts, fit.coefficientsLow)
    let s = 0;
    let e = 0;
    const tmp: DD = { hi: 0, lo: 0 };
    for (let kk = 0; kk < r; kk++) {
      const jj = kept[kk]!;
      twoProd(row[jj]!, b[jj]!, tmp);
      const sn = s + tmp.hi;
      const bb = sn - s;
      e += s - (sn - bb) + (tmp.hi - bb) + tmp.lo + row[jj]! * bLow[jj]!;
      s = sn;
    }
    const value = finiteOr(s + e, "the prediction is too large to represent");
    if ("na" in sc || !C) {
      const why = "na" in sc ? sc : notAvailable("no column could be estimated");
      out.push({ value, seMean: why, seNew: why, lower: why, upper: why });
      continue;
    }
    const h = fit.hatOfNewRow(row);
    const sg = scaleByPow2(sc.s, sc.e);
    const seMean = finiteOr(sg * Math.sqrt(h), "the standard error is too large to represent");
    const seNew: Quantity = fit.spec.varianceKnown
      ? notAvailable("with standard uncertainties as weights, the uncertainty of a new observation is not known; use the confidence interval and add the new observation's own uncertainty")
      : finiteOr(sg * Math.sqrt(1 + h), "the standard error is too large to represent");
    const pr: Prediction = { value, seMean, seNew };
    if (interval) {
      const se = interval === "confidence" ? seMean : seNew;
      if (typeof crit !== "number") pr.lower = pr.upper = crit;
      else if (typeof se !== "number") pr.lower = pr.upper = se;
      else if (typeof value !== "number") pr.lower = pr.upper = value;
      else {
        pr.lower = finiteOr(value - crit * se, "the limit is too large to represent");
        pr.upper = finiteOr(value + crit * se, "the limit is too large to represent");
      }
    }
    out.push(pr);
  }
  return out;
}

/**
 * Studentized (deleted) residual of each used row, length n; NaN where it is not defined
 * (no σ, exact fit, leverage 1, or fewer than two residual degrees of freedom).
 */
export function studentized(fit: LeastSquaresFit): Float64Array {
  const n = fit.n;
  const out = new Float64Array(n).fill(NaN);
  const h = fit.leverageUsed();
  const sig = sigmaScaled(fit);
  const df = fit.residualDf;
  const gap = leverageOneGap(fit.rank);
  if (typeof sig === "number" && sig > 0 && df > 1)
    for (let t = 0; t < n; t++) {
      const oneMinus = 1 - Math.min(1, h[t]!);
      if (oneMinus <= gap) continue;
      const s = fit.residScaled[t]! / (sig * Math.sqrt(oneMinus));
      const d = df - s * s;
      if (d > 0) out[t] = s * Math.sqrt((df - 1) / d);
    }
  return out;
}

/** Influence measures for every input row (computed on demand from the cached leverage). */
export function influenceRows(fit: LeastSquaresFit): InfluenceRow[] {
  const m = fit.shape.m;
  const h = fit.leverageUsed();
  const stud = fit.studentizedUsed();
  const sig = sigmaScaled(fit);
  const df = fit.residualDf;
  const r = fit.rank;
  const gap = leverageOneGap(r);
  const out: InfluenceRow[] = new Array<InfluenceRow>(m);
  const naZero = notAvailable("this row has zero weight, so it does not influence the fit");
  const naSkip = notAvailable("this row was skipped (missing value)");
  const naLev1 = notAvailable("this row alone determines part of the fit (leverage 1), so its residual is always zero");
  const naExact = notAvailable("the model fits exactly (all residuals are zero)");
  const naDf = notAvailable("deleting a row would leave no residual degrees of freedom");
  const naAll = notAvailable("this row's residual accounts for all of the scatter, so its deleted residual is unbounded");
  for (let i = 0; i < m; i++) {
    const st = fit.status[i]!;
    if (st === RowStatus.ZeroWeight) out[i] = { leverage: 0, standardized: naZero, studentized: naZero, cooks: naZero };
    else if (st !== RowStatus.Used) out[i] = { leverage: naSkip, standardized: naSkip, studentized: naSkip, cooks: naSkip };
  }
  for (let t = 0; t < fit.n; t++) {
    const i = fit.used[t]!;
    const lev = Math.min(1, h[t]!);
    if (typeof sig !== "number") {
      out[i] = { leverage: lev, standardized: sig, studentized: sig, cooks: sig };
      continue;
    }
    const oneMinus = 1 - lev;
    if (oneMinus <= gap) {
      out[i] = { leverage: lev, standardized: naLev1, studentized: naLev1, cooks: naLev1 };
      continue;
    }
    if (sig === 0) {
      out[i] = { leverage: lev, standardized: naExact, studentized: naExact, cooks: naExact };
      continue;
    }
    const s = fit.residScaled[t]! / (sig * Math.sqrt(oneMinus));
    const cooks = (s * s * lev) / (r * oneMinus);
    const st = stud[t]!;
    out[i] = { leverage: lev, standardized: s, studentized: Number.isNaN(st) ? (df <= 1 ? naDf : naAll) : st, cooks };
  }
  return out;
}
