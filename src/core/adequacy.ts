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
 *   power) — and the t test of its coefficient (normal with known variances).
 */
import { notAvailable, type Quantity } from "./errors";
import { fUpper } from "./distributions";
import { MAX_DEGREE } from "./design";
import { scaleByPow2 } from "./scale";
import { twoProd, type DD } from "./dd";
import { finiteOr } from "./inference";
import { ADDED_TERM_MAX_WORK } from "./tolerances";
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
 * The added-term test of curvature (module comment). `refit` builds the extended fit from a spec
 * (the caller's constructor, so options carry over).
 */
export function addedTerm(fit: LeastSquaresFit, refit: (spec: LeastSquaresFit["spec"]) => LeastSquaresFit): AddedTerm {
  const { k, degree, m } = fit.shape;
  const spec = fit.spec;
  let term: string;
  let ext: LeastSquaresFit["spec"];
  if (k === 1) {
    if (degree >= MAX_DEGREE) return { term: `x^${degree + 1}`, t: notAvailable(`the degree is already ${MAX_DEGREE}, the highest the functions fit`), p: notAvailable(`the degree is already ${MAX_DEGREE}`) };
    term = `x^${degree + 1}`;
    ext = { ...spec, degree: degree + 1 };
  } else {
    term = "the square of the fitted values";
    const fitted = fit.fittedAndResiduals().fitted;
    const x = new Float64Array(m * (k + 1));
    x.set(spec.x);
    for (let i = 0; i < m; i++) x[k * m + i] = fitted[i]! * fitted[i]!;
    ext = { ...spec, x, cols: k + 1 };
  }
  if (fit.n <= fit.rank + 1) {
    const na = notAvailable("too few rows to fit one more term and still measure the scatter");
    return { term, t: na, p: na };
  }
  if (fit.n * (fit.parameters + 1) ** 2 > ADDED_TERM_MAX_WORK) {
    const na = notAvailable(`not run: refitting ${fit.n} rows with one more term is too much work for a cell formula (limit: rows × (parameters + 1)² ≤ ${ADDED_TERM_MAX_WORK.toExponential(0)}); use GOF's lack-of-fit test with repeated x values, or fit a higher degree directly`);
    return { term, t: na, p: na };
  }
  let f2: LeastSquaresFit;
  try {
    f2 = refit(ext);
  } catch {
    const na = notAvailable("the extended model could not be fitted (its values span too wide a range)");
    return { term, t: na, p: na };
  }
  const last = f2.shape.p - 1;
  if (f2.keptIndex()[last]! < 0) {
    const na = notAvailable(`${term} is a combination of the model's columns in these data, so it cannot be tested`);
    return { term, t: na, p: na };
  }
  const row = f2.parameterTable(0.95)[last]!;
  return { term, t: row.t, p: row.p };
}
