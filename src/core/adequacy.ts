/**
 * Tests of the model itself (is a line, or this polynomial, adequate?):
 *
 * - **Lack of fit against pure error**, when some x rows repeat (NIST/SEMATECH e-Handbook
 *   §4.4.4.3; Draper & Smith, Applied Regression Analysis, ch. 2): the residual sum of squares
 *   splits into pure error SS_PE = Σ_groups Σ_i w_i (y_i − ȳ_g)² (ȳ_g the weighted mean of the rows
 *   with identical x), with n − g degrees of freedom, and lack of fit SS_LOF = RSS − SS_PE with
 *   g − rank; F = (SS_LOF/df_LOF)/(SS_PE/df_PE) against F(df_LOF, df_PE).
 * - **An added term** (for data without replicates): the same fit with one more term — the next
 *   power of x for a single-x model, else the square of the fitted values (Ramsey's RESET with one
 *   power) — and the t test of its coefficient (normal with known variances), computed from the
 *   existing factorization (`addedTerm`).
 */
import { notAvailable, type Quantity } from "./errors";
import { fUpper, normalTwoSided, tTwoSided } from "./distributions";
import { fillDesignColumn, MAX_DEGREE } from "./design";
import { exponentOf, scaleArrayByPow2, scaleByPow2 } from "./scale";
import { twoProd, type DD } from "./dd";
import { nrm2 } from "./qr";
import { columnView, refineAugmented } from "./refine";
import { sumSquares } from "./sums";
import { finiteOr } from "./inference";
import type { LeastSquaresFit } from "./fit";

export interface LackOfFit {
  sumSquares: Quantity;
  df: Quantity;
  pureErrorSumSquares: Quantity;
  pureErrorDf: Quantity;
  F: Quantity;
  p: Quantity;
  /** Number of distinct x rows among the used rows. */
  groups: number;
}

export interface AddedTerm {
  /** What was added, in words ("x^3", "the square of the fitted values"). */
  term: string;
  t: Quantity;
  p: Quantity;
}

/** Used rows grouped by identical x (all columns, exactly equal values): group index per used row. */
function groupsOfX(fit: LeastSquaresFit): { group: Int32Array; count: number } {
  const { used, n } = fit;
  const { m, k } = fit.shape;
  const x = fit.spec.x;
  const group = new Int32Array(n);
  if (n === 0) return { group, count: 0 };
  if (k === 1) {
    // One column: sort the values (typed-array sort), keep the distinct ones, and find each row's
    // group by binary search.
    const v = Float64Array.from(used, (i) => x[i]!).sort();
    const distinct: number[] = [];
    for (let s = 0; s < n; s++) if (s === 0 || v[s] !== v[s - 1]) distinct.push(v[s]!);
    const d = Float64Array.from(distinct);
    for (let t = 0; t < n; t++) {
      const xv = x[used[t]!]!;
      let lo = 0;
      let hi = d.length - 1;
      while (lo < hi) {
        const mid = (lo + hi) >> 1;
        if (d[mid]! < xv) lo = mid + 1;
        else hi = mid;
      }
      group[t] = lo;
    }
    return { group, count: d.length };
  }
  // Repeated x rows need a repeated value in the first column: when the first column's values are
  // all distinct (a typed-array sort), every row is its own group and no row comparison is needed.
  const first = Float64Array.from(used, (i) => x[i]!).sort();
  let repeated = false;
  for (let s = 1; s < n && !repeated; s++) if (first[s] === first[s - 1]) repeated = true;
  if (!repeated) {
    for (let t = 0; t < n; t++) group[t] = t;
    return { group, count: n };
  }
  const order = Array.from({ length: n }, (_, t) => t);
  const cmp = (a: number, b: number): number => {
    for (let c = 0; c < k; c++) {
      const d = x[c * m + used[a]!]! - x[c * m + used[b]!]!;
      if (d !== 0) return d;
    }
    return 0;
  };
  order.sort(cmp);
  let count = 0;
  for (let s = 0; s < n; s++) {
    if (s > 0 && cmp(order[s - 1]!, order[s]!) !== 0) count++;
    group[order[s]!] = count;
  }
  return { group, count: count + 1 };
}

export function lackOfFit(fit: LeastSquaresFit): LackOfFit {
  const { n } = fit;
  const { group, count: g } = groupsOfX(fit);
  const dfPe = n - g;
  const dfLof = g - fit.rank;
  const base = { groups: g };
  if (n === 0) {
    const na = notAvailable("no rows could be used");
    return { ...base, sumSquares: na, df: na, pureErrorSumSquares: na, pureErrorDf: na, F: na, p: na };
  }
  if (dfPe === 0) {
    const na = notAvailable("no x value is repeated, so pure error cannot be told apart from lack of fit; measure some standards more than once (CHECK uses an added-term test instead)");
    return { ...base, sumSquares: na, df: na, pureErrorSumSquares: na, pureErrorDf: 0, F: na, p: na };
  }
  // Weighted group means in double-double (Σ w·y / Σ w, compensated), then Σ w·(y − ȳ_g)².
  const w = fit.spec.weights;
  const y = fit.spec.y;
  const sHi = new Float64Array(g);
  const sLo = new Float64Array(g);
  const wSum = new Float64Array(g);
  const wLo = new Float64Array(g);
  const tmp: DD = { hi: 0, lo: 0 };
  for (let t = 0; t < n; t++) {
    const i = fit.used[t]!;
    const c = group[t]!;
    const wi = w ? w[i]! : 1;
    twoProd(wi, y[i]!, tmp);
    let sn = sHi[c]! + tmp.hi;
    let bb = sn - sHi[c]!;
    sLo[c]! += sHi[c]! - (sn - bb) + (tmp.hi - bb) + tmp.lo;
    sHi[c] = sn;
    sn = wSum[c]! + wi;
    bb = sn - wSum[c]!;
    wLo[c]! += wSum[c]! - (sn - bb) + (wi - bb);
    wSum[c] = sn;
  }
  const meanHi = new Float64Array(g);
  const meanLo = new Float64Array(g);
  for (let c = 0; c < g; c++) {
    const W = wSum[c]! + wLo[c]!;
    const mh = (sHi[c]! + sLo[c]!) / W;
    // one Newton correction of the quotient in double-double: (S − mh·W)/W
    twoProd(mh, wSum[c]!, tmp);
    const rem = sHi[c]! - tmp.hi - tmp.lo + sLo[c]! - mh * wLo[c]!;
    meanHi[c] = mh;
    meanLo[c] = rem / W;
  }
  let s = 0;
  let e = 0;
  for (let t = 0; t < n; t++) {
    const i = fit.used[t]!;
    const c = group[t]!;
    const d = y[i]! - meanHi[c]! - meanLo[c]!;
    const v = (w ? w[i]! : 1) * d * d;
    const sn = s + v;
    const bb = sn - s;
    e += s - (sn - bb) + (v - bb);
    s = sn;
  }
  const sspe = s + e;
  const rss = scaleByPow2(fit.rssScaled, -2 * fit.ys);
  const sslof = Math.max(0, rss - sspe);
  const sspeQ = finiteOr(sspe, "the pure-error sum of squares is too large to represent");
  if (dfLof <= 0) {
    const na = notAvailable(`there are only ${g} distinct x value${g === 1 ? "" : "s"} for ${fit.rank} estimated parameter${fit.rank === 1 ? "" : "s"}, so there is nothing left to test the model's shape with`);
    return { ...base, sumSquares: na, df: dfLof < 0 ? na : 0, pureErrorSumSquares: sspeQ, pureErrorDf: dfPe, F: na, p: na };
  }
  const lofQ = finiteOr(sslof, "the lack-of-fit sum of squares is too large to represent");
  if (sspe === 0) {
    const na = notAvailable("the repeated measurements agree exactly (pure error is zero), so the F ratio is unbounded");
    return { ...base, sumSquares: lofQ, df: dfLof, pureErrorSumSquares: 0, pureErrorDf: dfPe, F: na, p: na };
  }
  const F = finiteOr(sslof / dfLof / (sspe / dfPe), "the F ratio is too large to represent");
  return { ...base, sumSquares: lofQ, df: dfLof, pureErrorSumSquares: sspeQ, pureErrorDf: dfPe, F, p: typeof F === "number" ? fUpper(F, dfLof, dfPe) : F };
}

/**
 * The added-term test of curvature (module comment), without refitting: by the Frisch–Waugh–Lovell
 * theorem the added column z enters only through its residual z_r after regression on the model's
 * columns, so b_z = z_rᵀr / z_rᵀz_r and RSS' = RSS − (z_rᵀr)²/z_rᵀz_r exactly, with r the fit's
 * refined residual. z_r comes from the existing factor: refined on the augmented system (Householder
 * path) or two corrected seminormal steps (fast path, condition number below about 50). One pass
 * over the data per step instead of a new factorization.
 */
export function addedTerm(fit: LeastSquaresFit): AddedTerm {
  const { k, degree, m } = fit.shape;
  const spec = fit.spec;
  const n = fit.n;
  const term = k === 1 ? `x^${degree + 1}` : "the square of the fitted values";
  if (k === 1 && degree >= MAX_DEGREE) return { term, t: notAvailable(`the degree is already ${MAX_DEGREE}, the highest the functions fit`), p: notAvailable(`the degree is already ${MAX_DEGREE}`) };
  const df = fit.residualDf - 1;
  if (fit.rank === 0 || (!spec.varianceKnown && df < 1)) {
    const na = notAvailable("too few rows to fit one more term and still measure the scatter");
    return { term, t: na, p: na };
  }
  // z̃: the added column in the fit's weighted scaled space (double-double), then scaled by a power of two to unit length
  const zHi = new Float64Array(n);
  const zLo = new Float64Array(n);
  const sw = fit.problem.sw;
  if (k === 1) {
    const shape = { ...fit.shape, degree: degree + 1, p: fit.parameters + 1 };
    fillDesignColumn({ ...spec, degree: degree + 1 }, shape, fit.parameters, fit.used, sw?.hi ?? null, sw?.lo ?? null, fit.problem.preExp, zHi, zLo, 0);
  } else {
    const f = fit.fittedAndResiduals().fitted;
    const tmp: DD = { hi: 0, lo: 0 };
    for (let t = 0; t < n; t++) {
      const v = f[fit.used[t]!]! * f[fit.used[t]!]!;
      if (sw) {
        twoProd(v, sw.hi[t]!, tmp);
        zHi[t] = tmp.hi;
        zLo[t] = tmp.lo + v * sw.lo[t]!;
      } else zHi[t] = v;
    }
  }
  const e = -exponentOf(nrm2(zHi, 0, n));
  scaleArrayByPow2(zHi, 0, n, e);
  scaleArrayByPow2(zLo, 0, n, e);
  if (!zHi.every((v) => Number.isFinite(v))) {
    const na = notAvailable(`${term} spans too wide a range of magnitudes to test`);
    return { term, t: na, p: na };
  }
  const zr = projectOut(fit, zHi, zLo);
  const zz = sumSquares(zr, 0, n);
  if (!(zz > (fit.factor.tolerance * 4) ** 2)) {
    const na = notAvailable(`${term} is a combination of the model's columns in these data, so it cannot be tested`);
    return { term, t: na, p: na };
  }
  const r = fit.residScaled;
  let g = 0;
  let gc = 0;
  for (let t = 0; t < n; t++) {
    const v = zr[t]! * r[t]!;
    const sn = g + v;
    const bb = sn - g;
    gc += g - (sn - bb) + (v - bb);
    g = sn;
  }
  g += gc;
  let tStat: number;
  let pv: number;
  if (spec.varianceKnown) {
    tStat = scaleByPow2(g / Math.sqrt(zz), -fit.ys);
    pv = normalTwoSided(tStat);
  } else {
    const rss = fit.rssScaled - (g * g) / zz;
    if (!(rss > 0)) {
      const na = notAvailable(`adding ${term} makes the fit exact, so its t statistic is unbounded`);
      return { term, t: na, p: na };
    }
    tStat = g / Math.sqrt((zz * rss) / df);
    pv = tTwoSided(tStat, df);
  }
  const tq = finiteOr(tStat, "the t statistic is too large to represent");
  return { term, t: tq, p: typeof tq === "number" ? pv : tq };
}

/** z − X̃(X̃ᵀX̃)⁻¹X̃ᵀz for the fit's kept columns: the part of z the model cannot express. */
function projectOut(fit: LeastSquaresFit, zHi: Float64Array, zLo: Float64Array): Float64Array {
  const n = fit.n;
  const qr = fit.householder;
  const r = fit.rank;
  if (qr) return refineAugmented(qr, fit.design, r, 1, zHi, zLo, null).r;
  // fast path (condition number below about 50): corrected seminormal steps in working precision,
  // c ← c + (RᵀR)⁻¹X̃ᵀ(z − X̃c); the solve and one correction bring c to a few ε (each step
  // contracts the error by about κ²ε ≤ 1e-12).
  const kept = fit.factor.kept;
  const views = Array.from(kept.subarray(0, r), (j) => columnView(fit.design, j));
  const c = new Float64Array(r);
  const s = new Float64Array(n);
  const g = new Float64Array(r);
  const residual = (): void => {
    for (let t = 0; t < n; t++) s[t] = zHi[t]! + zLo[t]!;
    views.forEach((v, j) => {
      const a = c[j]! * v.scale;
      if (a === 0) return;
      for (let t = 0; t < n; t++) s[t]! -= a * v.data[v.off + t]!;
    });
  };
  for (let step = 0; step < 2; step++) {
    residual();
    views.forEach((v, j) => {
      let acc = 0;
      for (let t = 0; t < n; t++) acc += v.data[v.off + t]! * s[t]!;
      g[j] = acc * v.scale;
    });
    fit.factor.solveRt(r, g);
    fit.factor.solveR(r, g);
    for (let j = 0; j < r; j++) c[j]! += g[j]!;
  }
  residual();
  return s;
}
