/**
 * The scaled problem: from what the user asked for (ModelSpec) to the exactly scaled, weighted
 * design and response that every later step works on.
 *
 * 1. Rows with a missing y, x or weight are skipped; zero-weight rows are kept aside.
 * 2. Each x column and y are divided by a power of two (exact) so nothing overflows; the design
 *    (intercept, x columns or dd powers) is multiplied by √w in double-double.
 * 3. Each design column is scaled by a power of two so its norm lies in [0.5, 1) (exact
 *    equilibration). An unweighted degree-1 design with every row used is not copied: its
 *    columns are views into x.
 *
 * Scaled quantities carry a tilde in comments: X̃ = √W·X·2^cs (per column), ỹ = √W·y·2^ys.
 * True values follow exactly: b_j = b̃_j·2^(cs_j − ys), (XᵀWX)⁻¹_ij = C̃_ij·2^(cs_i + cs_j),
 * σ = σ̃·2^(−ys).
 */
import { LsqError } from "./errors";
import { RowStatus, classifyRows, designPreExp, fillDesignColumn, sqrtWeights, validateSpec, type ModelShape, type ModelSpec } from "./design";
import { nrm2 } from "./qr";
import { columnOf, type ColumnView, type DDMatrix } from "./refine";
import { exponentOf, pow2, scaleArrayByPow2, scaleByPow2 } from "./scale";
import { twoProd, type DD } from "./dd";

export class ScaledProblem {
  readonly spec: ModelSpec;
  readonly shape: ModelShape;
  /** Status of every input row (RowStatus). */
  readonly status: Uint8Array;
  /** For rows skipped because of x: the x column that was missing (empty when no row misses x). */
  readonly missingCol: Int32Array;
  /** Input rows used in the fit (complete, weight > 0). */
  readonly used: Int32Array;
  /** Number of used rows. */
  readonly n: number;
  /** Exponent of each x column's largest magnitude (x is pre-divided by 2^preExp). */
  readonly preExp: Int32Array;
  /** √w of the used rows as double-double pairs (null: unweighted). */
  readonly sw: { hi: Float64Array; lo: Float64Array } | null;
  /** Design column scale exponents: stored = true · √w · 2^cs[j]. */
  readonly cs: Int32Array;
  /** Response scale exponent: ỹ = y · √w · 2^ys. */
  readonly ys: number;
  /** The exact scaled weighted design (n × p, dd). */
  readonly design: DDMatrix;
  /** ỹ = y·√w·2^ys (high and low parts) for the used rows. */
  readonly yHi: Float64Array;
  readonly yLo: Float64Array | null;

  /** Each row's status from x and the weights alone (as if y were complete). */
  readonly missingX: Uint8Array;
  /** Each row's first missing x column whatever y holds (empty when no x is missing). */
  readonly xMissingCol: Int32Array;
  /** True when the design (and √w) are those of the base problem given to the constructor. */
  readonly sharesDesign: boolean;

  /**
   * @param base - a problem with the same x, weights, intercept and degree (the caller has checked
   *   their content): when its used rows are the same, its design, scales and √w are reused and only
   *   y is scaled anew (several y columns against one x).
   */
  constructor(spec: ModelSpec, base: ScaledProblem | null = null) {
    this.spec = spec;
    const shape = validateSpec(spec);
    this.shape = shape;
    const reuse = base && base.shape.m === shape.m && base.shape.k === shape.k ? { missingX: base.missingX, missingCol: base.xMissingCol, preExp: base.preExp } : null;
    const { status, used, missingCol, preExp, missingX, xMissingCol } = classifyRows(spec, shape, reuse);
    this.missingX = missingX;
    this.xMissingCol = xMissingCol;
    this.status = status;
    this.missingCol = missingCol;
    this.used = used;
    const n = used.length;
    this.n = n;
    const p = shape.p;
    this.preExp = preExp;
    const share = !!base && base.shape.p === p && base.n === n && sameInts(base.used, used) && sameInts(base.preExp, preExp);
    this.sharesDesign = share;
    this.sw = share ? base!.sw : sqrtWeights(spec.weights, used);
    const sw = this.sw;

    // Design (weighted, pre-scaled), then exact equilibration of each column. Low parts exist
    // only for weighted or polynomial designs. An unweighted degree-1 design with every row used
    // is not copied at all: its columns are views into x (and a column of ones) times a power of
    // two; only a Householder factorization gets its own scaled copy.
    const views = share ? null : !sw && shape.degree < 2 && n === shape.m ? this.columnViews() : null;
    let hi: Float64Array;
    let lo: Float64Array | null = null;
    let anyLo = false;
    const cs = new Int32Array(p);
    if (share) {
      hi = base!.design.hi;
      lo = base!.design.lo;
      cs.set(base!.cs);
    } else if (views) {
      hi = new Float64Array(0);
      views.cols.forEach((_v, j) => (cs[j] = views.cs[j]!));
    } else {
      hi = new Float64Array(n * p);
      lo = !!sw || shape.degree >= 2 ? new Float64Array(n * p) : null;
      for (let j = 0; j < p; j++) {
        if (fillDesignColumn(spec, shape, j, used, sw?.hi ?? null, sw?.lo ?? null, this.preExp, hi, lo, j * n)) anyLo = true;
        const e2 = -exponentOf(nrm2(hi, j * n, n));
        scaleArrayByPow2(hi, j * n, n, e2);
        if (lo) scaleArrayByPow2(lo, j * n, n, e2);
        cs[j] = e2 - designPreExp(shape, spec.intercept, this.preExp, j);
        checkFinite(hi, lo, j * n, n, j, spec, shape);
      }
    }
    this.cs = cs;
    this.design = share ? base!.design : views ? { m: n, hi, lo: null, cols: views.cols } : { m: n, hi, lo: anyLo ? lo : null };

    // Response ỹ = y·√w·2^ys in dd: y is scaled so its largest magnitude lies in [0.5, 1), then,
    // once multiplied by √w, scaled again the same way (weights can be as large or small as any
    // double), so sums of squares neither overflow nor underflow.
    let ymax = 0;
    for (let t = 0; t < n; t++) ymax = Math.max(ymax, Math.abs(spec.y[used[t]!]!));
    let ys = -exponentOf(ymax);
    const yHi = new Float64Array(n);
    const yLo = sw ? new Float64Array(n) : null;
    const tmp: DD = { hi: 0, lo: 0 };
    const yc = Math.max(-1000, Math.min(1000, ys));
    const ys1 = pow2(yc);
    const ys2 = pow2(ys - yc); // 1 unless |ys| > 1000: two exact multiplications then
    for (let t = 0; t < n; t++) {
      const v = spec.y[used[t]!]! * ys1 * ys2;
      if (sw) {
        twoProd(v, sw.hi[t]!, tmp);
        yHi[t] = tmp.hi;
        yLo![t] = tmp.lo + v * sw.lo[t]!;
      } else yHi[t] = v;
    }
    if (yLo) {
      let wmax = 0;
      for (let t = 0; t < n; t++) wmax = Math.max(wmax, Math.abs(yHi[t]!));
      const e = -exponentOf(wmax);
      scaleArrayByPow2(yHi, 0, n, e);
      scaleArrayByPow2(yLo, 0, n, e);
      ys += e;
    }
    this.ys = ys;
    this.yHi = yHi;
    this.yLo = yLo;
  }

  /**
   * Column views for an unweighted degree-1 design with every row used: column j is the x column
   * (or a column of ones) times 2^cs[j], where cs puts the column's length in [0.5, 1). Returns
   * null when a scale factor would leave the range where one multiplication is exact.
   */
  private columnViews(): { cols: ColumnView[]; cs: Int32Array } | null {
    const { spec, shape } = this;
    const m = shape.m;
    const cols: ColumnView[] = [];
    const cs = new Int32Array(shape.p);
    let j = 0;
    if (spec.intercept) {
      const e = -exponentOf(Math.sqrt(m));
      cols.push({ data: ones(m), off: 0, scale: pow2(e) });
      cs[j++] = e;
    }
    for (let c = 0; c < shape.k; c++, j++) {
      const pre = this.preExp[c]!;
      const s = scaleByPow2(1, -pre);
      if (!(s > 0 && Number.isFinite(s)) || Math.abs(pre) > 1000) return null;
      let ss = 0;
      for (let i = c * m; i < (c + 1) * m; i++) {
        const v = spec.x[i]! * s;
        ss += v * v;
      }
      const e = -exponentOf(Math.sqrt(ss)) - pre;
      if (Math.abs(e) > 1000) return null;
      cols.push({ data: spec.x, off: c * m, scale: pow2(e) });
      cs[j] = e;
    }
    return { cols, cs };
  }

  /** Design column j (scaled, weighted, high parts) as a plain array of the used rows. */
  designColumn(j: number): Float64Array {
    return columnOf(this.design, j);
  }

  /**
   * The design row of new x values in user units (unweighted): [1,] x₁…x_k, or [1,] x, x², …, x^d.
   * `newx` is q × k column-major; row t is written into `row` (length p).
   */
  designRow(newx: ArrayLike<number>, q: number, t: number, row: Float64Array): void {
    const { k, degree } = this.shape;
    let j = 0;
    if (this.spec.intercept) row[j++] = 1;
    if (degree >= 2) {
      let v = 1;
      for (let e = 1; e <= degree; e++) row[j++] = v *= newx[t]!;
    } else for (let c = 0; c < k; c++) row[j++] = newx[c * q + t]!;
  }

  /**
   * Design column j for the given input rows in the scaled units of the fit (true·2^cs, no √w),
   * as a double-double (hi, lo): for rows that are not used (zero-weight rows).
   */
  unweightedColumn(j: number, rows: Int32Array, hi: Float64Array, lo: Float64Array): void {
    fillDesignColumn(this.spec, this.shape, j, rows, null, null, this.preExp, hi, lo, 0);
    // hi holds true·2^(−pre); bring it to true·2^cs.
    const e = this.cs[j]! + designPreExp(this.shape, this.spec.intercept, this.preExp, j);
    scaleArrayByPow2(hi, 0, rows.length, e);
    scaleArrayByPow2(lo, 0, rows.length, e);
  }

  /** Number of skipped rows (missing values), and of rows with zero weight. */
  rowCounts(): { skipped: number; zeroWeight: number } {
    const { status } = this;
    let zeroWeight = 0;
    // Only weights can make a row "zero weight"; every other unused row was skipped.
    if (this.spec.weights) for (let i = 0; i < status.length; i++) if (status[i] === RowStatus.ZeroWeight) zeroWeight++;
    return { skipped: status.length - this.n - zeroWeight, zeroWeight };
  }

  /** Bytes held by this problem's arrays (not the caller's x and y); `shared` leaves out a design it shares. */
  bytesOwned(shared: boolean): number {
    const own = shared ? [] : [this.design.hi, this.design.lo, this.sw?.hi, this.sw?.lo];
    const a = [this.status, this.missingX, this.missingCol, this.used, this.preExp, this.cs, this.yHi, this.yLo, ...own];
    let s = 0;
    for (const v of a) if (v) s += v.byteLength;
    return s;
  }
}

function sameInts(a: Int32Array, b: Int32Array): boolean {
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return false;
  return true;
}

function checkFinite(hi: Float64Array, lo: Float64Array | null, off: number, n: number, j: number, spec: ModelSpec, shape: ModelShape): void {
  for (let t = off; t < off + n; t++) {
    if (!Number.isFinite(hi[t]!) || (lo !== null && !Number.isFinite(lo[t]!))) {
      const what = shape.degree >= 2 ? `the power ${j + (spec.intercept ? 0 : 1)} of x` : `column ${j + (spec.intercept ? 0 : 1)} of x`;
      throw new LsqError("range", `${what} spans too wide a range of magnitudes to represent; rescale x (for example, change units)`);
    }
  }
}

/** A shared read-only column of ones (the intercept's view), kept for up to 2^21 rows. */
let onesCache = new Float64Array(0);
function ones(m: number): Float64Array {
  if (onesCache.length >= m) return onesCache;
  const a = new Float64Array(m).fill(1);
  if (m <= 2 ** 21) onesCache = a;
  return a;
}
