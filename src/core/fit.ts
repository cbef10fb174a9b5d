/**
 * A least-squares fit: the factorization computed once, then asked questions.
 *
 *     minimize  Σ_i w_i (y_i − x_iᵀ b)²      over the rows i that are used
 *
 * Pipeline (all exact except the factorization itself, which refinement then corrects):
 * 1. Rows with a missing y, x or weight are skipped; zero-weight rows are kept aside.
 * 2. Each x column and y are divided by a power of two (exact) so nothing overflows; the
 *    design (intercept, x columns or dd powers) is multiplied by √w in double-double.
 * 3. Each design column is scaled by a power of two so its norm lies in [0.5, 1) (exact
 *    equilibration). An unweighted degree-1 design with every row used is not copied: its
 *    columns are views into x.
 * 4. Fast path first (normal.ts): a Gram matrix with a proven error bound, its Cholesky factor
 *    through HouseholderQR's one rank decision, parameter-space refinement and a compensated
 *    residual — kept only when its error bounds guarantee full accuracy (well-conditioned,
 *    full-rank designs that are not nearly exact fits).
 * 5. Otherwise the high parts are factored by HouseholderQR, which makes the one rank decision
 *    (kept / non-identifiable columns, in the user's order); coefficients and dependency
 *    relations are refined on the augmented system with double-double residuals against the
 *    exact (dd) design; the covariance is refined through an accurate Gram matrix (κ ≤ 1e7) or
 *    the augmented system (above), see scaledCovariance().
 *
 * Scaled quantities carry a tilde in comments: X̃ = √W·X·2^cs (per column), ỹ = √W·y·2^ys.
 * True values follow exactly: b_j = b̃_j·2^(cs_j − ys), (XᵀWX)⁻¹_ij = C̃_ij·2^(cs_i + cs_j),
 * σ = σ̃·2^(−ys).
 */
import { LsqError, notAvailable, type NotAvailable, type Quantity } from "./errors";
import {
  RowStatus,
  classifyRows,
  designPreExp,
  fillDesignColumn,
  sqrtWeights,
  validateSpec,
  type ModelShape,
  type ModelSpec,
} from "./design";
import { defaultTolerance, EPS, HouseholderQR, nrm2, tmatLength } from "./qr";
import { Workspace } from "./kernels";
import { columnOf, columnView, ddGram, RATE, REFINE_SCRATCH, refineAugmented, residualUpdate, type ColumnView, type DDMatrix } from "./refine";
import { exponentOf, pow2, scaleArrayByPow2, scaleByPow2 } from "./scale";
import { SPLITTER, twoProd, twoSum, type DD } from "./dd";
import { fUpper, tQuantile, tTwoSided } from "./distributions";
import { conditionNumber, type Conditioning } from "./condition";
import { gramResidual, gramScratch, splitGram, splitGramBound, type BoundedGram } from "./gram";
import { normalPathEnabled, normalScratch, solveNormal } from "./normal";

/** How a non-identifiable design column depends on the kept columns before it. */
export interface Dependency {
  /** The non-identifiable design column. */
  readonly column: number;
  /** Kept design columns it is expressed in (all kept columns before it). */
  readonly on: Int32Array;
  /** Coefficients in the user's units: column ≈ Σ coef[t] · column on[t]. */
  readonly coef: Float64Array;
  /** The same coefficients for the equilibrated columns (a measure of each term's share). */
  readonly scaled: Float64Array;
  /** True when the column is zero in every used row (then coef is empty). */
  readonly zero: boolean;
  /** Relative size of the part of the column not explained by the relation (0 = exact). */
  readonly remainder: number;
}

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
  /** True when R² is the centred one (model with intercept). */
  centred: boolean;
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
}

const NA_SIGMA_DF0 = "the fit has no residual degrees of freedom (as many parameters as used rows), so the scatter of the data cannot be estimated";

export class LeastSquaresFit {
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
  /** Design column scale exponents: stored = true · √w · 2^cs[j]. */
  readonly cs: Int32Array;
  /** Response scale exponent: ỹ = y · √w · 2^ys. */
  readonly ys: number;
  /** The exact scaled weighted design (n × p, dd). */
  readonly design: DDMatrix;
  /**
   * Householder QR of the design ("householder"), or — on the fast path for well-conditioned
   * full-rank designs (normal.ts) — of the p × p Cholesky factor of its Gram matrix ("normal");
   * either way it carries R, the kept columns and the rank decision.
   */
  readonly qr: HouseholderQR;
  /** Which path produced the fit (see `qr`). */
  readonly method: "normal" | "householder";
  /** Refined scaled coefficients for the kept columns (length rank). */
  readonly coefScaled: Float64Array;
  /** Weighted scaled residuals r̃ of the used rows. */
  readonly residScaled: Float64Array;
  /** Σ r̃², scaled. */
  readonly rssScaled: number;
  /** Refinement steps and convergence for the coefficients. */
  readonly refineSteps: number;
  readonly refineConverged: boolean;
  private readonly preExp: Int32Array;
  private readonly sw: { hi: Float64Array; lo: Float64Array } | null;
  /** ỹ = y·√w·2^ys (high and low parts) for the used rows. */
  readonly yHi: Float64Array;
  readonly yLo: Float64Array | null;
  private covCache: Float64Array | null = null;
  private depCache: Dependency[] | null = null;
  private levCache: Float64Array | null = null;
  private studCache: Float64Array | null = null;
  private infCache: InfluenceRow[] | null = null;
  private statsCache: FitStatistics | null = null;
  private condCache: Conditioning | null = null;
  /** The Gram matrix of the fast path (normal.ts), reused for the covariance. */
  private fastGram: BoundedGram | null = null;
  private outCache: { fitted: Float64Array; resid: Float64Array } | null = null;

  constructor(spec: ModelSpec) {
    this.spec = spec;
    const shape = validateSpec(spec);
    this.shape = shape;
    const { status, used, missingCol, preExp } = classifyRows(spec, shape);
    this.status = status;
    this.missingCol = missingCol;
    this.used = used;
    const n = used.length;
    this.n = n;
    const p = shape.p;
    this.preExp = preExp;
    this.sw = sqrtWeights(spec.weights, used);
    const sw = this.sw;

    // Design (weighted, pre-scaled), then exact equilibration of each column. Low parts exist
    // only for weighted or polynomial designs. An unweighted degree-1 design with every row used
    // is not copied at all: its columns are views into x (and a column of ones) times a power of
    // two; only the factorization gets its own scaled copy.
    const views = !sw && shape.degree < 2 && n === shape.m ? this.columnViews(spec, shape) : null;
    let hi: Float64Array;
    let lo: Float64Array | null = null;
    let anyLo = false;
    const cs = new Int32Array(p);
    if (views) {
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
    this.design = views ? { m: n, hi, lo: null, cols: views.cols } : { m: n, hi, lo: anyLo ? lo : null };

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

    const tol = spec.tolerance === undefined || Number.isNaN(spec.tolerance) ? defaultTolerance(n, p) : spec.tolerance;
    // Fast path first (normal.ts): well-conditioned full-rank designs, with a proven accuracy
    // check; otherwise Householder QR of the design and augmented-system refinement.
    const fast = normalPathEnabled() && tol >= 0 ? solveNormal(this.design, n, p, yHi, yLo, tol, Workspace.scratch(normalScratch(n, p))) : null;
    let r: Float64Array;
    if (fast) {
      this.method = "normal";
      this.qr = fast.qr;
      this.fastGram = fast.gram;
      this.coefScaled = fast.x;
      this.refineSteps = fast.steps;
      this.refineConverged = true;
      r = fast.r;
    } else {
      // The factor (and the refinement's work vectors) live in a WebAssembly workspace when the
      // kernels are available (kernels.ts); everything else is the same either way.
      const ws = Workspace.create(n * p + tmatLength(n, p) + Math.max(REFINE_SCRATCH * n, gramScratch(p)) + 64);
      const qrInput = ws ? ws.alloc(n * p) : new Float64Array(n * p);
      if (views)
        views.cols.forEach((v, j) => {
          const { data, off, scale } = v;
          for (let t = 0, o = j * n; t < n; t++) qrInput[o + t] = data[off + t]! * scale;
        });
      else qrInput.set(hi);
      this.method = "householder";
      this.qr = new HouseholderQR(qrInput, n, p, tol, ws);
      const sol = refineAugmented(this.qr, this.design, this.qr.rank, 1, yHi, yLo, null);
      this.coefScaled = sol.x;
      this.refineSteps = sol.steps[0] ?? 0;
      this.refineConverged = sol.converged[0] ?? true;
      r = sol.r;
    }
    const rank = this.qr.rank;

    // Residual: the refined residual block r̃ of the augmented system, which converges to the
    // exact residual whatever the rounding of the coefficients (ỹ − X̃·fl(b̃) would carry that
    // rounding, ~ε‖X̃‖‖b̃‖), or on the fast path ỹ − X̃·b̃ with b̃ a double-double accurate enough
    // for a proven bound (normal.ts). One exception: when ỹ − X̃ b̃ is exactly zero in compensated
    // arithmetic the fit is exact and the residual is reported as exactly zero (checked only
    // when the refined residual is already at rounding level).
    let rss = sumSquares(r, 0, n);
    let yy = 0; // a threshold only: ordinary arithmetic
    for (let t = 0; t < n; t++) yy += yHi[t]! * yHi[t]!;
    if (rss <= (64 * EPS) ** 2 * yy) {
      const s = Float64Array.from(yHi);
      const comp = yLo ? Float64Array.from(yLo) : new Float64Array(n);
      for (let k = 0; k < rank; k++) residualUpdate(this.design, this.qr.kept[k]!, -this.coefScaled[k]!, s, comp, n);
      let exact = true;
      for (let t = 0; t < n && exact; t++) if (s[t]! + comp[t]! !== 0) exact = false;
      if (exact) {
        r = new Float64Array(n);
        rss = 0;
      }
    }
    this.residScaled = r;
    this.rssScaled = rss;
  }

  /**
   * Column views for an unweighted degree-1 design with every row used: column j is the x column
   * (or a column of ones) times 2^cs[j], where cs puts the column's length in [0.5, 1). Returns
   * null when a scale factor would leave the range where one multiplication is exact.
   */
  private columnViews(spec: ModelSpec, shape: ModelShape): { cols: ColumnView[]; cs: Int32Array } | null {
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

  // ------------------------------------------------------------------ structure

  get rank(): number {
    return this.qr.rank;
  }

  /** Number of parameters p (design columns). */
  get parameters(): number {
    return this.shape.p;
  }

  /** Residual degrees of freedom: used rows − rank (never negative). */
  get residualDf(): number {
    return Math.max(0, this.n - this.rank);
  }

  /** For each design column: its position among the kept columns, or −1 if non-identifiable. */
  keptIndex(): Int32Array {
    const idx = new Int32Array(this.shape.p).fill(-1);
    this.qr.kept.forEach((c, k) => (idx[c] = k));
    return idx;
  }

  /** Number of skipped rows (missing values), and of rows with zero weight. */
  rowCounts(): { skipped: number; zeroWeight: number } {
    const { status } = this;
    let zeroWeight = 0;
    // Only weights can make a row "zero weight"; every other unused row was skipped.
    if (this.spec.weights) for (let i = 0; i < status.length; i++) if (status[i] === RowStatus.ZeroWeight) zeroWeight++;
    return { skipped: status.length - this.n - zeroWeight, zeroWeight };
  }

  // ------------------------------------------------------------------ coefficients

  /** Coefficients in the user's units, one per design column; NaN marks non-identifiable. */
  coefficients(): Float64Array {
    const b = new Float64Array(this.shape.p).fill(NaN);
    const { kept } = this.qr;
    for (let k = 0; k < kept.length; k++) {
      const j = kept[k]!;
      b[j] = scaleByPow2(this.coefScaled[k]!, this.cs[j]! - this.ys);
    }
    return b;
  }

  /** Dependency relation of every non-identifiable column on the kept columns before it. */
  dependencies(): Dependency[] {
    if (this.depCache) return this.depCache;
    const out: Dependency[] = [];
    const { qr, design, cs } = this;
    const n = this.n;
    for (const j of qr.dropped) {
      const nk = qr.keptBefore[j]!;
      const colHi = columnOf(design, j);
      const colNorm = nrm2(colHi, 0, n);
      if (colNorm === 0) {
        out.push({ column: j, on: new Int32Array(0), coef: new Float64Array(0), scaled: new Float64Array(0), zero: true, remainder: 0 });
        continue;
      }
      const bHi = colHi;
      const bLo = design.lo ? design.lo.subarray(j * n, (j + 1) * n) : null;
      const sol = nk > 0 ? refineAugmented(qr, design, nk, 1, bHi, bLo, null) : null;
      const on = qr.kept.slice(0, nk);
      const coef = new Float64Array(nk);
      for (let k = 0; k < nk; k++) coef[k] = scaleByPow2(sol!.x[k]!, cs[on[k]!]! - cs[j]!);
      const rem = sol ? nrm2(sol.r, 0, n) / colNorm : 1;
      out.push({ column: j, on, coef, scaled: sol ? sol.x : new Float64Array(0), zero: false, remainder: rem });
    }
    this.depCache = out;
    return out;
  }

  // ------------------------------------------------------------------ fitted values and residuals

  /**
   * Fitted values and residuals (unweighted, user units) for every input row whose x and y
   * are complete, including zero-weight rows; NaN for skipped rows. For used rows the residual
   * is the refined residual block r̃/√w (accurate even when the coefficients are ill-determined)
   * and the fitted value is y − residual; zero-weight rows are evaluated from the coefficients.
   */
  fittedAndResiduals(): { fitted: Float64Array; resid: Float64Array } {
    if (this.outCache) return this.outCache;
    const m = this.shape.m;
    const fitted = new Float64Array(m);
    const resid = new Float64Array(m);
    if (this.n < m) {
      fitted.fill(NaN);
      resid.fill(NaN);
    }
    const ys = this.ys;
    const sw = this.sw;
    const { used, residScaled } = this;
    const y = this.spec.y;
    // Multiplications by 2^±ys, each split in two factors when |ys| > 1000 (exact either way).
    const c = Math.max(-1000, Math.min(1000, ys));
    const up1 = pow2(c);
    const up2 = pow2(ys - c);
    const down1 = pow2(-c);
    const down2 = pow2(c - ys);
    for (let t = 0; t < this.n; t++) {
      const i = used[t]!;
      const r = sw ? residScaled[t]! / sw.hi[t]! : residScaled[t]!;
      resid[i] = r * down1 * down2;
      fitted[i] = (y[i]! * up1 * up2 - r) * down1 * down2;
    }
    const rows: number[] = [];
    for (let i = 0; i < m; i++) if (this.status[i] === RowStatus.ZeroWeight) rows.push(i);
    if (rows.length > 0) {
      const idx = Int32Array.from(rows);
      const nc = idx.length;
      const s = new Float64Array(nc);
      const comp = new Float64Array(nc);
      const colHi = new Float64Array(nc);
      const colLo = new Float64Array(nc);
      const col: DDMatrix = { m: nc, hi: colHi, lo: colLo };
      const { kept } = this.qr;
      for (let k = 0; k < kept.length; k++) {
        const j = kept[k]!;
        fillDesignColumn(this.spec, this.shape, j, idx, null, null, this.preExp, colHi, colLo, 0);
        // colHi holds true·2^(−pre); bring it to true·2^cs.
        const e = this.cs[j]! + designPreExp(this.shape, this.spec.intercept, this.preExp, j);
        scaleArrayByPow2(colHi, 0, nc, e);
        scaleArrayByPow2(colLo, 0, nc, e);
        residualUpdate(col, 0, this.coefScaled[k]!, s, comp, nc);
      }
      const tmp: DD = { hi: 0, lo: 0 };
      for (let t = 0; t < nc; t++) {
        const i = idx[t]!;
        fitted[i] = scaleByPow2(s[t]! + comp[t]!, -ys);
        twoSum(scaleByPow2(this.spec.y[i]!, ys), -s[t]!, tmp);
        resid[i] = scaleByPow2(tmp.hi + (tmp.lo - comp[t]!), -ys);
      }
    }
    this.outCache = { fitted, resid };
    return this.outCache;
  }

  // ------------------------------------------------------------------ covariance

  /**
   * Refined unscaled covariance of the scaled kept design, C̃ = (X̃_Kᵀ X̃_K)⁻¹, rank × rank
   * column-major. Column k solves the augmented system with right-hand side [0; e_k].
   *
   * Keeping the residual block exactly at r = −X̃c (in double-double) reduces that refinement to
   * the k-space iteration c ← c + R⁻¹R⁻ᵀ(e_k − G c) with the Gram matrix G = X̃ᵀX̃ formed once in
   * double-double; this is used while the condition number κ ≤ 1e7, where its attainable accuracy
   * (about κ²ε² relative) is below one unit in the last place. Above that the full augmented
   * refinement over all rows is used, column by column (slower, accuracy about κε²).
   */
  scaledCovariance(): Float64Array {
    if (this.covCache) return this.covCache;
    const r = this.rank;
    let out: Float64Array;
    const cond = r > 0 ? this.condition() : null;
    if (this.fastGram) out = refineCovarianceGram(this.qr, this.fastGram, r);
    else if (cond && cond.value <= 1e7) {
      // The fast Gram matrix when its proven error, amplified by ‖G⁻¹‖ = 1/σ_min², stays below
      // ε/16 (well-conditioned designs); otherwise the double-double one.
      const fast = splitGramBound(this.n, r, !!this.design.lo) <= (EPS / 16) * cond.sigmaMin * cond.sigmaMin;
      const G = fast ? splitGram(this.design, this.qr.kept, r, this.qr.ws) : ddGram(this.design, this.qr.kept, r);
      out = refineCovarianceGram(this.qr, G, r);
    } else {
      const c = new Float64Array(r * r);
      for (let k = 0; k < r; k++) c[k * r + k] = 1;
      const sol = refineAugmented(this.qr, this.design, r, r, null, null, c);
      out = sol.x;
      for (let t = 0; t < out.length; t++) out[t] = -out[t]!;
    }
    // Symmetrize (the two triangles agree to rounding after refinement).
    for (let i = 0; i < r; i++)
      for (let j = i + 1; j < r; j++) {
        const v = 0.5 * (out[i * r + j]! + out[j * r + i]!);
        out[i * r + j] = v;
        out[j * r + i] = v;
      }
    this.covCache = out;
    return out;
  }

  /** σ̃ (scaled residual standard error) or why it is not available. */
  private sigmaScaled(): Quantity {
    const df = this.residualDf;
    if (df === 0) return notAvailable(NA_SIGMA_DF0);
    return Math.sqrt(this.rssScaled / df);
  }

  /**
   * Covariance of the estimates, p × p row-major in the user's units: σ²·(XᵀWX)⁻¹ over the kept
   * columns; NotAvailable for rows/columns of non-identifiable parameters or when σ is not defined.
   */
  covariance(): Quantity[][] {
    const p = this.shape.p;
    const sig = this.sigmaScaled();
    const idx = this.keptIndex();
    const r = this.rank;
    const C = this.scaledCovariance();
    const out: Quantity[][] = [];
    for (let i = 0; i < p; i++) {
      const row: Quantity[] = [];
      for (let j = 0; j < p; j++) {
        const ki = idx[i]!;
        const kj = idx[j]!;
        if (ki < 0 || kj < 0) row.push(notAvailable(nonIdentMsg(ki < 0 ? i : j)));
        else if (typeof sig !== "number") row.push(sig);
        else row.push(finiteOr(scaleByPow2(sig * sig * C[kj * r + ki]!, this.cs[i]! + this.cs[j]! - 2 * this.ys), "the covariance is too large or too small to represent"));
      }
      out.push(row);
    }
    return out;
  }

  // ------------------------------------------------------------------ statistics

  /** Summary statistics (computed once; callers must not modify the result). */
  statistics(): FitStatistics {
    if (!this.statsCache) this.statsCache = this.computeStatistics();
    return this.statsCache;
  }

  private computeStatistics(): FitStatistics {
    const n = this.n;
    const rank = this.rank;
    const df = this.residualDf;
    const { skipped, zeroWeight } = this.rowCounts();
    const centred = this.spec.intercept;
    const ys = this.ys;
    const exact = this.rssScaled === 0;
    const sig = this.sigmaScaled();
    const rss = n === 0 ? notAvailable("no rows could be used") : finiteOr(scaleByPow2(this.rssScaled, -2 * ys), "the residual sum of squares is too large to represent");
    const sigma = typeof sig === "number" ? finiteOr(scaleByPow2(sig, -ys), "too large to represent") : sig;

    const tss = this.totalSumOfSquaresScaled();
    // Regression sum of squares TSS − RSS (≥ 0 up to rounding).
    const ssrScaled = Math.max(0, tss - this.rssScaled);
    let rSquared: Quantity;
    let adj: Quantity;
    if (n === 0) rSquared = notAvailable("no rows could be used");
    else if (tss === 0) rSquared = notAvailable(centred ? "y does not vary, so there is nothing for the model to explain" : "every y value is zero");
    else rSquared = 1 - this.rssScaled / tss;
    const nc = centred ? n - 1 : n;
    if (typeof rSquared !== "number") adj = rSquared;
    else if (df === 0) adj = notAvailable(NA_SIGMA_DF0);
    else adj = 1 - ((1 - rSquared) * nc) / df;

    const dfReg = rank - (centred ? 1 : 0);
    let F: Quantity;
    let Fp: Quantity;
    if (dfReg <= 0) F = notAvailable("the model has no terms to test beyond the intercept");
    else if (df === 0) F = notAvailable(NA_SIGMA_DF0);
    else if (exact) F = notAvailable("the model fits the data exactly (all residuals are zero), so the F statistic is unbounded");
    else F = finiteOr(ssrScaled / dfReg / (this.rssScaled / df), "the F statistic is too large to represent");
    if (typeof F === "number") Fp = fUpper(F, dfReg, df);
    else Fp = F;

    // Gaussian log-likelihood with the ML variance RSS/n and variances σ²/w_i.
    let logL: Quantity;
    if (n === 0) logL = notAvailable("no rows could be used");
    else if (exact) logL = notAvailable("the model fits the data exactly, so the likelihood is unbounded");
    else {
      let sumLogW = 0;
      const w = this.spec.weights;
      if (w) for (let t = 0; t < n; t++) sumLogW += Math.log(w[this.used[t]!]!);
      const lnRss = Math.log(this.rssScaled) - 2 * ys * Math.LN2;
      logL = -0.5 * n * (Math.log(2 * Math.PI) + lnRss - Math.log(n) + 1) + 0.5 * sumLogW;
    }
    const kParams = rank + 1; // identifiable coefficients plus the error variance
    const aic: Quantity = typeof logL === "number" ? -2 * logL + 2 * kParams : logL;
    const bic: Quantity = typeof logL === "number" ? -2 * logL + Math.log(n) * kParams : logL;

    let cond: Quantity;
    if (rank === 0) cond = notAvailable("no column could be estimated");
    else cond = this.condition().value;

    return {
      observationsUsed: n,
      observationsSkipped: skipped,
      zeroWeightRows: zeroWeight,
      parameters: this.shape.p,
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
      centred,
    };
  }

  /**
   * Total sum of squares, scaled by 2^(2ys): Σ w (y − ȳ_w)² with an intercept (centred),
   * Σ w y² without (uncentred), accumulated in compensated arithmetic from the exact ỹ.
   * R² uses 1 − RSS/TSS rather than the sum of squares of the fitted values: RSS is
   * insensitive to first order to the rounding of the coefficients, the fitted values are not.
   */
  private totalSumOfSquaresScaled(): number {
    const n = this.n;
    if (n === 0) return 0;
    const { yHi, yLo, sw } = this;
    const dev = new Float64Array(n);
    if (!this.spec.intercept) {
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
      const w = sw ? this.spec.weights![this.used[t]!]! : 1;
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

  /** Condition number (2-norm) of the kept design with columns scaled to unit length, and the weakest direction. */
  condition(): Conditioning {
    if (!this.condCache) this.condCache = conditionNumber(this.qr);
    return this.condCache;
  }

  /** Parameter table at a confidence level in (0, 1). */
  parameterTable(level: number): ParameterRow[] {
    if (!(level > 0 && level < 1)) throw new LsqError("range", "the confidence level must be between 0 and 1, e.g. 0.95");
    const p = this.shape.p;
    const b = this.coefficients();
    const idx = this.keptIndex();
    const sig = this.sigmaScaled();
    const df = this.residualDf;
    const r = this.rank;
    const C = r > 0 ? this.scaledCovariance() : new Float64Array(0);
    const q = df > 0 ? tQuantile(0.5 + level / 2, df) : NaN;
    const rows: ParameterRow[] = [];
    for (let j = 0; j < p; j++) {
      const k = idx[j]!;
      if (k < 0) {
        const na = notAvailable(nonIdentMsg(j));
        rows.push({ estimate: na, standardError: na, t: na, p: na, lower: na, upper: na });
        continue;
      }
      const est = finiteOr(b[j]!, "the estimate is too large to represent");
      if (typeof sig !== "number") {
        rows.push({ estimate: est, standardError: sig, t: sig, p: sig, lower: sig, upper: sig });
        continue;
      }
      const se = finiteOr(scaleByPow2(sig * Math.sqrt(C[k * r + k]!), this.cs[j]! - this.ys), "the standard error is too large to represent");
      let t: Quantity;
      let pv: Quantity;
      if (typeof se !== "number" || typeof est !== "number") t = pv = notAvailable("the estimate or its standard error is not available");
      else if (se === 0) t = pv = notAvailable("the standard error is zero (the model fits exactly), so the t statistic is unbounded");
      else {
        t = finiteOr(est / se, "the t statistic is too large to represent");
        pv = typeof t === "number" ? tTwoSided(t, df) : t;
      }
      let lower: Quantity = notAvailable("the estimate or its standard error is not available");
      let upper: Quantity = lower;
      if (typeof se === "number" && typeof est === "number") {
        lower = finiteOr(est - q * se, "the limit is too large to represent");
        upper = finiteOr(est + q * se, "the limit is too large to represent");
      }
      rows.push({ estimate: est, standardError: se, t, p: pv, lower, upper });
    }
    return rows;
  }

  // ------------------------------------------------------------------ influence

  /**
   * Leverage h_i of each used row (diagonal of the weighted hat matrix), length n:
   * h_i = ‖z_i‖² with Z = X̃_K R⁻¹ (Z equals Q₁ in exact arithmetic). Rows are processed in
   * cache-sized blocks and Z is never stored whole. Accuracy about κ·ε, like any backward-stable
   * computation of the hat matrix.
   */
  leverageUsed(): Float64Array {
    if (this.levCache) return this.levCache;
    const n = this.n;
    const r = this.rank;
    const { qr, design } = this;
    const h = new Float64Array(n);
    if (r > 0 && this.leverageKernel(h)) {
      this.levCache = h;
      return h;
    }
    const B = 512;
    const z = new Float64Array(B * r);
    for (let i0 = 0; i0 < n; i0 += B) {
      const nb = Math.min(B, n - i0);
      for (let k = 0; k < r; k++) {
        const zk = k * B;
        const cv = columnView(design, qr.kept[k]!);
        const src = cv.off + i0;
        for (let i = 0; i < nb; i++) z[zk + i] = cv.data[src + i]! * cv.scale;
        for (let l = 0; l < k; l++) {
          const rl = qr.r(l, k);
          if (rl === 0) continue;
          const zl = l * B;
          for (let i = 0; i < nb; i++) z[zk + i]! -= rl * z[zl + i]!;
        }
        const inv = 1 / qr.r(k, k);
        for (let i = 0; i < nb; i++) {
          const v = z[zk + i]! * inv;
          z[zk + i] = v;
          h[i0 + i]! += v * v;
        }
      }
    }
    this.levCache = h;
    return h;
  }

  /** leverageUsed's loop as the WebAssembly kernel `lev`, over panels of rows; false when unavailable. */
  private leverageKernel(h: Float64Array): boolean {
    const { n, rank: r, qr, design } = this;
    const P = 1024;
    const ws = Workspace.scratch(2 * r * P + r * r + r + P + 64);
    if (!ws) return false;
    const panel = ws.alloc(r * P);
    const z = ws.alloc(r * P);
    const R = ws.alloc(r * r);
    const scales = ws.alloc(r);
    const hp = ws.alloc(P);
    for (let k = 0; k < r; k++) for (let l = 0; l <= k; l++) R[k * r + l] = qr.r(l, k);
    const views = Array.from(qr.kept.subarray(0, r), (c) => columnView(design, c));
    views.forEach((v, k) => (scales[k] = v.scale));
    for (let i0 = 0; i0 < n; i0 += P) {
      const rows = Math.min(P, n - i0);
      views.forEach((v, k) => panel.set(v.data.subarray(v.off + i0, v.off + i0 + rows), k * P));
      ws.k.lev(panel.byteOffset, r, rows, P, scales.byteOffset, R.byteOffset, z.byteOffset, hp.byteOffset);
      h.set(hp.subarray(0, rows), i0);
    }
    return true;
  }

  /**
   * Studentized (deleted) residual of each used row, length n; NaN where it is not defined
   * (no σ, exact fit, leverage 1, or fewer than two residual degrees of freedom). Cached.
   */
  studentizedUsed(): Float64Array {
    if (this.studCache) return this.studCache;
    const n = this.n;
    const out = new Float64Array(n).fill(NaN);
    const h = this.leverageUsed();
    const sig = this.sigmaScaled();
    const df = this.residualDf;
    if (typeof sig === "number" && sig > 0 && df > 1)
      for (let t = 0; t < n; t++) {
        const oneMinus = 1 - Math.min(1, h[t]!);
        if (oneMinus <= 1e-12) continue;
        const s = this.residScaled[t]! / (sig * Math.sqrt(oneMinus));
        const d = df - s * s;
        if (d > 0) out[t] = s * Math.sqrt((df - 1) / d);
      }
    this.studCache = out;
    return out;
  }

  /** Influence measures for every input row (cached; callers must not modify the result). */
  influence(): InfluenceRow[] {
    if (this.infCache) return this.infCache;
    const m = this.shape.m;
    const h = this.leverageUsed();
    const stud = this.studentizedUsed();
    const sig = this.sigmaScaled();
    const df = this.residualDf;
    const r = this.rank;
    const out: InfluenceRow[] = new Array<InfluenceRow>(m);
    const naZero = notAvailable("this row has zero weight, so it does not influence the fit");
    const naSkip = notAvailable("this row was skipped (missing value)");
    const naLev1 = notAvailable("this row alone determines part of the fit (leverage 1), so its residual is always zero");
    const naExact = notAvailable("the model fits exactly (all residuals are zero)");
    const naDf = notAvailable("deleting a row would leave no residual degrees of freedom");
    const naAll = notAvailable("this row's residual accounts for all of the scatter, so its deleted residual is unbounded");
    for (let i = 0; i < m; i++) {
      const st = this.status[i]!;
      if (st === RowStatus.ZeroWeight) out[i] = { leverage: 0, standardized: naZero, studentized: naZero, cooks: naZero };
      else if (st !== RowStatus.Used) out[i] = { leverage: naSkip, standardized: naSkip, studentized: naSkip, cooks: naSkip };
    }
    for (let t = 0; t < this.n; t++) {
      const i = this.used[t]!;
      const hi = Math.min(1, h[t]!);
      if (typeof sig !== "number") {
        out[i] = { leverage: hi, standardized: sig, studentized: sig, cooks: sig };
        continue;
      }
      const oneMinus = 1 - hi;
      if (oneMinus <= 1e-12) {
        out[i] = { leverage: hi, standardized: naLev1, studentized: naLev1, cooks: naLev1 };
        continue;
      }
      if (sig === 0) {
        out[i] = { leverage: hi, standardized: naExact, studentized: naExact, cooks: naExact };
        continue;
      }
      const s = this.residScaled[t]! / (sig * Math.sqrt(oneMinus));
      const cooks = (s * s * hi) / (r * oneMinus);
      const st = stud[t]!;
      out[i] = { leverage: hi, standardized: s, studentized: Number.isNaN(st) ? (df <= 1 ? naDf : naAll) : st, cooks };
    }
    this.infCache = out;
    return out;
  }

  // ------------------------------------------------------------------ prediction

  /**
   * Predictions at new rows of x (q × k column-major, user units, unweighted).
   * A new row that breaks a dependency found in the data cannot be predicted.
   */
  predict(newx: Float64Array, q: number): Prediction[] {
    const { k, p, degree } = this.shape;
    if (newx.length !== q * k) throw new LsqError("shape", `newx must have ${k} column${k === 1 ? "" : "s"}, like x`);
    const b = this.coefficients();
    const deps = this.dependencies();
    const r = this.rank;
    const sig = this.sigmaScaled();
    const out: Prediction[] = [];
    const row = new Float64Array(p);
    const z = new Float64Array(r);
    for (let t = 0; t < q; t++) {
      let missing = -1;
      for (let c = 0; c < k; c++) if (!Number.isFinite(newx[c * q + t]!)) missing = c;
      if (missing >= 0) {
        const na = notAvailable(`column ${missing + 1} of this new row is empty or not a number`);
        out.push({ value: na, seMean: na, seNew: na });
        continue;
      }
      let j = 0;
      if (this.spec.intercept) row[j++] = 1;
      if (degree >= 2) {
        let v = 1;
        for (let e = 1; e <= degree; e++) row[j++] = v *= newx[t]!;
      } else for (let c = 0; c < k; c++) row[j++] = newx[c * q + t]!;
      // Does the row obey every dependency of the data?
      let broken: Dependency | null = null;
      for (const d of deps) {
        let s = row[d.column]!;
        let mag = Math.abs(s);
        for (let u = 0; u < d.on.length; u++) {
          const v = d.coef[u]! * row[d.on[u]!]!;
          s -= v;
          mag += Math.abs(v);
        }
        if (Math.abs(s) > 1.5e-8 * mag) broken = d;
      }
      if (broken) {
        const na = notAvailable(`this new row does not follow the dependency between columns found in the data (design column ${broken.column + 1}), so its prediction cannot be estimated`);
        out.push({ value: na, seMean: na, seNew: na });
        continue;
      }
      let val = 0;
      for (let kk = 0; kk < r; kk++) {
        const jj = this.qr.kept[kk]!;
        val += row[jj]! * b[jj]!;
        z[kk] = scaleByPow2(row[jj]!, this.cs[jj]!);
      }
      const value = finiteOr(val, "the prediction is too large to represent");
      if (typeof sig !== "number") {
        out.push({ value, seMean: sig, seNew: sig });
        continue;
      }
      this.qr.solveRt(r, z);
      let h = 0;
      for (let kk = 0; kk < r; kk++) h += z[kk]! * z[kk]!;
      const sg = scaleByPow2(sig, -this.ys);
      out.push({
        value,
        seMean: finiteOr(sg * Math.sqrt(h), "too large to represent"),
        seNew: finiteOr(sg * Math.sqrt(1 + h), "too large to represent"),
      });
    }
    return out;
  }

  /** Quantile of t with the residual degrees of freedom, for intervals at `level`. */
  tCritical(level: number): Quantity {
    if (!(level > 0 && level < 1)) throw new LsqError("range", "the confidence level must be between 0 and 1, e.g. 0.95");
    if (this.residualDf === 0) return notAvailable(NA_SIGMA_DF0);
    return tQuantile(0.5 + level / 2, this.residualDf);
  }
}

function nonIdentMsg(j: number): string {
  return `design column ${j + 1} is not identifiable (it is a combination of earlier columns)`;
}

function finiteOr(v: number, reason: string): Quantity {
  return Number.isFinite(v) ? v : notAvailable(reason);
}

/** Σ v² with compensated summation of exact squares. */
export function sumSquares(v: Float64Array, off: number, n: number): number {
  let s = 0;
  let c = 0;
  for (let i = off; i < off + n; i++) {
    const x = v[i]!;
    // TwoProduct(x, x) by Dekker's splitting, inline (x² = p + e exactly)
    const p = x * x;
    const t = SPLITTER * x;
    const xh = t - (t - x);
    const xl = x - xh;
    const e = xh * xh - p + xh * xl + xl * xh + xl * xl;
    const sn = s + p;
    const bb = sn - s;
    c += s - (sn - bb) + (p - bb) + e;
    s = sn;
  }
  return s + c;
}

function checkFinite(hi: Float64Array, lo: Float64Array | null, off: number, n: number, j: number, spec: ModelSpec, shape: ModelShape): void {
  for (let t = off; t < off + n; t++) {
    if (!Number.isFinite(hi[t]!) || (lo !== null && !Number.isFinite(lo[t]!))) {
      const what = shape.degree >= 2 ? `the power ${j + (spec.intercept ? 0 : 1)} of x` : `column ${j + (spec.intercept ? 0 : 1)} of x`;
      throw new LsqError("range", `${what} spans too wide a range of magnitudes to represent; rescale x (for example, change units)`);
    }
  }
}

export type { NotAvailable };

/** A shared read-only column of ones (the intercept's view), kept for up to 2^21 rows. */
let onesCache = new Float64Array(0);
function ones(m: number): Float64Array {
  if (onesCache.length >= m) return onesCache;
  const a = new Float64Array(m).fill(1);
  if (m <= 2 ** 21) onesCache = a;
  return a;
}

/**
 * Refine C = G⁻¹ (G given as a double-double) with the triangular factor R (RᵀR ≈ G):
 * C ← C + R⁻¹R⁻ᵀ(I − G C), residuals in compensated arithmetic, until the correction is below
 * ε‖C‖ or stops halving.
 */
function refineCovarianceGram(qr: HouseholderQR, G: { hi: Float64Array; lo: Float64Array }, r: number): Float64Array {
  const c = new Float64Array(r * r);
  const col = new Float64Array(r);
  const unit = new Float64Array(r);
  for (let t = 0; t < r; t++) {
    const o = t * r;
    unit.fill(0);
    unit[t] = 1;
    let prev = Infinity;
    for (let step = 0; step < 10; step++) {
      // residual e_t − G c_t
      gramResidual(G, r, unit, null, c.subarray(o, o + r), null, col);
      qr.solveRt(r, col);
      qr.solveR(r, col);
      let nd = 0;
      let nc = 0;
      for (let i = 0; i < r; i++) {
        nd = Math.max(nd, Math.abs(col[i]!));
        nc = Math.max(nc, Math.abs(c[o + i]! + col[i]!));
      }
      if (step > 0 && !(nd < prev)) break;
      for (let i = 0; i < r; i++) c[o + i]! += col[i]!;
      if (nd <= EPS * nc || (step > 1 && nd <= RATE * prev && (nd * nd) / prev <= 0.5 * EPS * nc)) break;
      if (step > 0 && nd > 0.5 * prev) break;
      prev = nd;
    }
  }
  return c;
}
