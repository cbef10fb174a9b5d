/**
 * Building the design matrix from a model description.
 *
 * Design columns, in order: the intercept (if any), then either the k columns of x as given
 * or, for a polynomial of degree d ≥ 2 in a single x, the powers x, x², …, x^d. Powers are
 * formed in double-double (hi + lo) so the refinement sees the exact-to-~2^-104 values rather
 * than powers rounded to double, as a spreadsheet that computes them in cells would have.
 *
 * Weighted rows are multiplied by √w, also as a double-double, so the weighted problem solved
 * is the one the user specified up to about 2^-104 relative in each entry.
 */
import { LsqError } from "./errors";
import { ddMul, ddSqrt, type DD } from "./dd";
import { exponentOf, pow2, scaleByPow2 } from "./scale";

/** What the user asks for. All arrays are read, never written. */
export interface ModelSpec {
  /** Response, m values. NaN marks a missing value (the row is skipped). */
  readonly y: Float64Array;
  /** Predictors, m × k column-major. NaN marks a missing value. */
  readonly x: Float64Array;
  /** m: number of input rows. */
  readonly rows: number;
  /** k: number of x columns. */
  readonly cols: number;
  /** Add a constant term, reported first. */
  readonly intercept: boolean;
  /** Optional nonnegative weights, m values; NaN marks missing; zero removes the row from the fit. */
  readonly weights?: Float64Array | null;
  /** Polynomial degree d (1 = the x columns as given); with d ≥ 2 x must have one column. */
  readonly degree?: number;
  /** Rank tolerance (see qr.ts); NaN/undefined = default. */
  readonly tolerance?: number;
  /**
   * The weights are 1/u² from known standard uncertainties u of y: the covariance is not rescaled
   * by the residual scatter (σ = 1) and intervals use the normal distribution (inference.ts).
   */
  readonly varianceKnown?: boolean;
}

/** Why an input row is not part of the fit. */
export enum RowStatus {
  Used = 0,
  MissingY = 1,
  MissingX = 2,
  MissingWeight = 3,
  ZeroWeight = 4,
}

export const MAX_DEGREE = 20;

/** Validated shape of a model. */
export interface ModelShape {
  readonly m: number;
  readonly k: number;
  readonly degree: number;
  /** Number of design columns p. */
  readonly p: number;
}

/** Check the model description and return its shape; throws LsqError naming the argument. */
export function validateSpec(spec: ModelSpec): ModelShape {
  const m = spec.rows;
  const k = spec.cols;
  if (!Number.isInteger(m) || m < 0 || !Number.isInteger(k) || k < 0) throw new LsqError("shape", "x must have a whole number of rows and columns");
  if (spec.y.length !== m) throw new LsqError("shape", `y has ${spec.y.length} values but x has ${m} rows`);
  if (spec.x.length !== m * k) throw new LsqError("shape", "x storage does not match its rows × columns");
  if (spec.weights && spec.weights.length !== m) throw new LsqError("shape", `weights has ${spec.weights.length} values but x has ${m} rows`);
  const degree = spec.degree ?? 1;
  if (!Number.isInteger(degree) || degree < 1 || degree > MAX_DEGREE) throw new LsqError("range", `degree must be a whole number from 1 to ${MAX_DEGREE}`);
  if (degree >= 2 && k !== 1) throw new LsqError("shape", `a polynomial of degree ${degree} needs x to be a single column, but x has ${k} columns`);
  const p = (spec.intercept ? 1 : 0) + (degree >= 2 ? degree : k);
  return { m, k, degree, p };
}

/**
 * Classify every input row; throws LsqError for a non-finite number or a negative weight. In the
 * same pass over x, `preExp`: the exponent of each column's largest finite magnitude (0 for an
 * empty or zero column). The engine divides column c by 2^preExp[c] (exactly) before forming
 * products and powers, so nothing overflows even for entries near the largest double.
 */
export function classifyRows(spec: ModelSpec, shape: ModelShape, base: { missingX: Uint8Array; missingCol: Int32Array; preExp: Int32Array } | null = null): { status: Uint8Array; used: Int32Array; missingCol: Int32Array; preExp: Int32Array; missingX: Uint8Array; xMissingCol: Int32Array } {
  if (base) return reclassify(spec, shape, base);
  const { m, k } = shape;
  const { y, x, weights } = spec;
  for (let i = 0; i < m; i++) {
    const yi = y[i]!;
    if (yi === Infinity || yi === -Infinity) throw new LsqError("range", `y in row ${i + 1} is infinite`);
  }
  // x: each column's largest magnitude (preExp), and the first missing column of each row
  // (whatever y holds, so another y over the same x can reuse it).
  let xCol = new Int32Array(0); // allocated at the first missing x value
  const preExp = new Int32Array(k);
  for (let j = 0; j < k; j++) {
    const off = j * m;
    let mx = 0;
    for (let i = 0; i < m; i++) {
      const v = x[off + i]!;
      const a = Math.abs(v);
      if (a > mx) {
        if (a === Infinity) throw new LsqError("range", `x in row ${i + 1}, column ${j + 1} is infinite`);
        mx = a;
      }
      if (Number.isNaN(v)) {
        if (xCol.length === 0) xCol = new Int32Array(m).fill(-1);
        if (xCol[i]! < 0) xCol[i] = j;
      }
    }
    preExp[j] = exponentOf(mx);
  }
  // The rows' status from x and the weights alone (as if y were complete).
  const missingX = new Uint8Array(m);
  if (xCol.length > 0) for (let i = 0; i < m; i++) if (xCol[i]! >= 0) missingX[i] = RowStatus.MissingX;
  if (weights)
    for (let i = 0; i < m; i++) {
      const w = weights[i]!;
      if (w < 0 || w === Infinity) throw new LsqError("range", `the weight in row ${i + 1} is ${w < 0 ? "negative" : "infinite"}; weights must be zero or positive`);
      if (missingX[i]) continue;
      if (Number.isNaN(w)) missingX[i] = RowStatus.MissingWeight;
      else if (w === 0) missingX[i] = RowStatus.ZeroWeight;
    }
  return reclassify(spec, shape, { missingX, missingCol: xCol, preExp });
}

function usedRows(status: Uint8Array): Int32Array {
  let n = 0;
  for (let i = 0; i < status.length; i++) if (status[i] === RowStatus.Used) n++;
  const used = new Int32Array(n);
  n = 0;
  for (let i = 0; i < status.length; i++) if (status[i] === RowStatus.Used) used[n++] = i;
  return used;
}

/**
 * The rows' status for a y, given the status from x and the weights alone (`base.missingX`, with
 * each row's first missing x column): a missing y comes first, then x, then the weight. Another y
 * over the same x and weights needs only this pass over y.
 */
function reclassify(spec: ModelSpec, shape: ModelShape, base: { missingX: Uint8Array; missingCol: Int32Array; preExp: Int32Array }): { status: Uint8Array; used: Int32Array; missingCol: Int32Array; preExp: Int32Array; missingX: Uint8Array; xMissingCol: Int32Array } {
  const { m } = shape;
  const status = new Uint8Array(m);
  for (let i = 0; i < m; i++) {
    const yi = spec.y[i]!;
    if (yi === Infinity || yi === -Infinity) throw new LsqError("range", `y in row ${i + 1} is infinite`);
    status[i] = Number.isNaN(yi) ? RowStatus.MissingY : base.missingX[i]!;
  }
  // the missing x column of rows skipped because of x (empty when no row misses x)
  let missingCol = new Int32Array(0);
  if (base.missingCol.length > 0) {
    missingCol = new Int32Array(m).fill(-1);
    for (let i = 0; i < m; i++) if (status[i] === RowStatus.MissingX) missingCol[i] = base.missingCol[i]!;
  }
  return { status, used: usedRows(status), missingCol, preExp: base.preExp, missingX: base.missingX, xMissingCol: base.missingCol };
}

/**
 * The exponent that design column j carries from the pre-scaling: the stored value equals the
 * true value times 2^(−designPreExp). For a power x^q of a pre-scaled x it is q·preExp.
 */
export function designPreExp(shape: ModelShape, intercept: boolean, preExp: Int32Array, j: number): number {
  const jj = intercept ? j - 1 : j;
  if (jj < 0) return 0;
  return shape.degree >= 2 ? (jj + 1) * preExp[0]! : preExp[jj]!;
}

/**
 * Fill design column j for the given input rows: outHi[o + t] (+ outLo) for t over `rows`.
 * `sw` holds √w as dd pairs for the same rows (null: unweighted). `outLo` may be null only when
 * the column is exactly representable (unweighted, degree 1). Returns true when the column has
 * nonzero low parts.
 */
export function fillDesignColumn(
  spec: ModelSpec,
  shape: ModelShape,
  j: number,
  rows: Int32Array,
  swHi: Float64Array | null,
  swLo: Float64Array | null,
  preExp: Int32Array,
  outHi: Float64Array,
  outLo: Float64Array | null,
  o: number,
): boolean {
  const { m, degree } = shape;
  const n = rows.length;
  const jj = spec.intercept ? j - 1 : j;
  const x = spec.x;
  if (!swHi && (jj < 0 || degree < 2)) {
    // Exact fast path: the intercept, or a column of x scaled by a power of two.
    if (jj < 0) outHi.fill(1, o, o + n);
    else {
      const e = -preExp[jj]!;
      const s1 = pow2(Math.max(-1000, Math.min(1000, e)));
      const s2 = pow2(e - Math.max(-1000, Math.min(1000, e)));
      const off = jj * m;
      for (let t = 0; t < n; t++) outHi[o + t] = x[off + rows[t]!]! * s1 * s2;
    }
    if (outLo) outLo.fill(0, o, o + n);
    return false;
  }
  if (!outLo) throw new Error("fillDesignColumn: a low-part array is needed for weighted or polynomial columns");
  const tmp: DD = { hi: 0, lo: 0 };
  let anyLo = false;
  for (let t = 0; t < n; t++) {
    const i = rows[t]!;
    let hi: number;
    let lo = 0;
    if (jj < 0) hi = 1;
    else if (degree >= 2) {
      // x^(jj+1) in double-double by repeated multiplication.
      const xi = scaleByPow2(x[i]!, -preExp[0]!);
      hi = xi;
      for (let e = 1; e <= jj; e++) {
        ddMul(hi, lo, xi, 0, tmp);
        hi = tmp.hi;
        lo = tmp.lo;
      }
    } else hi = scaleByPow2(x[jj * m + i]!, -preExp[jj]!);
    if (swHi) {
      ddMul(hi, lo, swHi[t]!, swLo![t]!, tmp);
      hi = tmp.hi;
      lo = tmp.lo;
    }
    outHi[o + t] = hi;
    outLo[o + t] = lo;
    if (lo !== 0) anyLo = true;
  }
  return anyLo;
}

/** √w as dd pairs for the given rows (null when unweighted). */
export function sqrtWeights(weights: Float64Array | null | undefined, rows: Int32Array): { hi: Float64Array; lo: Float64Array } | null {
  if (!weights) return null;
  const hi = new Float64Array(rows.length);
  const lo = new Float64Array(rows.length);
  const tmp: DD = { hi: 0, lo: 0 };
  for (let t = 0; t < rows.length; t++) {
    ddSqrt(weights[rows[t]!]!, tmp);
    hi[t] = tmp.hi;
    lo[t] = tmp.lo;
  }
  return { hi, lo };
}
