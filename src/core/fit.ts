/**
 * A least-squares fit: the factorization computed once, then asked questions.
 *
 *     minimize  Σ_i w_i (y_i − x_iᵀ b)²      over the rows i that are used
 *
 * This class is a short façade over one file per job:
 *
 * | job | file |
 * |---|---|
 * | the scaled problem (rows used, exact scaling, the dd design and response) | problem.ts |
 * | the path (fast normal equations or Householder QR), coefficients, residual, the exact-fit decision | solve.ts |
 * | the refined covariance C̃ | covariance.ts |
 * | leverage | leverage.ts |
 * | σ, statistics, parameter table, predictions and their intervals, influence, χ² | inference.ts |
 * | every threshold | tolerances.ts |
 *
 * By-products are computed on first request and kept (`memo`); `retainedBytes` counts what a fit
 * holds, from the arrays themselves.
 */
import { LsqError, notAvailable, type NotAvailable, type Quantity } from "./errors";
import { RowStatus, type ModelShape, type ModelSpec } from "./design";
import { nrm2, type Factor, type HouseholderQR } from "./qr";
import { columnOf, dot2, refineAugmented, residualUpdate, type DDMatrix } from "./refine";
import { pow2, scaleByPow2 } from "./scale";
import { quadraticForm } from "./sums";
import { SPLITTER, twoSum, type DD } from "./dd";
import { conditionNumber, type Conditioning } from "./condition";
import { ScaledProblem } from "./problem";
import { solve, type FitOptions, type Solution } from "./solve";
import { covarianceRefused, refinedCovariance } from "./covariance";
import { correctionMatrix, hatCorrection, hatOfRow, leverage, leverageRefined } from "./leverage";
import {
  chiSquare,
  computeStatistics,
  covarianceTable,
  critical,
  influenceRows,
  parameterTable,
  predictions,
  studentized,
  type ChiSquare,
  type FitStatistics,
  type InfluenceRow,
  type ParameterRow,
  type Prediction,
} from "./inference";
import { defaultTolerance, LEVERAGE_REFINED_MAX_WORK } from "./tolerances";
import { addedTerm, lackOfFit, type AddedTerm, type LackOfFit } from "./adequacy";

export type { FitOptions } from "./solve";
export type { ChiSquare, FitStatistics, InfluenceRow, ParameterRow, Prediction } from "./inference";
export type { AddedTerm, LackOfFit } from "./adequacy";

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

/** By-products that depend only on the design and its factor, not on y (taken over by a fit that shares them). */
const DESIGN_ONLY = ["covariance", "covarianceRefused", "condition", "leverage", "hatCorrection", "dependencies", "dependencyDeviations"];

/** Refinement steps for a dependency relation (see `dependencies`). */
const DEPENDENCY_STEPS = 3;

export class LeastSquaresFit {
  readonly problem: ScaledProblem;
  private readonly sol: Solution;
  private readonly options: FitOptions;
  private readonly memo = new Map<string, unknown>();

  /**
   * @param base - a fit of another y with the same x, weights, intercept and degree (the caller
   *   compared their content): when the used rows are the same too, its design and factor are reused
   *   and only the y-dependent work is done, and by-products that depend only on the design (the
   *   covariance, the leverage, the conditioning, dependency relations) are taken over.
   */
  constructor(spec: ModelSpec, options: FitOptions = {}, base: LeastSquaresFit | null = null) {
    this.options = options;
    this.problem = new ScaledProblem(spec, base?.problem ?? null);
    const tol = spec.tolerance === undefined || Number.isNaN(spec.tolerance) ? defaultTolerance(this.problem.n, this.problem.shape.p) : spec.tolerance;
    // (the same options too: the path and the kernels decide which factor a fit of this y alone would make)
    const sameOptions = !!base && base.options.path === options.path && base.options.kernels === options.kernels;
    const shared = base && sameOptions && this.problem.sharesDesign && base.factor.tolerance === tol ? base.sol : null;
    this.sol = solve(this.problem, tol, options, shared);
    if (shared && this.sol.factor === shared.factor) {
      this.sharing = true;
      for (const key of DESIGN_ONLY) if (base!.memo.has(key)) this.memo.set(key, base!.memo.get(key));
      const W = (globalThis as { WeakRef?: new (o: object) => { deref(): object | undefined } }).WeakRef;
      this.owner = W ? new W(base!) : null;
    }
  }

  /** The fit whose design and factor this one shares, while it is alive (memory accounting). */
  private owner: { deref(): object | undefined } | null = null;

  /** Whether this fit reuses another fit's design and factor (several y columns against one x). */
  get sharesFactor(): boolean {
    return this.sharing;
  }
  private sharing = false;

  /** Compute once, keep the result (by-products asked for by several functions). */
  private once<T>(key: string, make: () => T): T {
    if (this.memo.has(key)) return this.memo.get(key) as T;
    const v = make();
    this.memo.set(key, v);
    return v;
  }

  // ------------------------------------------------------------------ the problem and its solution

  get spec(): ModelSpec {
    return this.problem.spec;
  }
  get shape(): ModelShape {
    return this.problem.shape;
  }
  /** Status of every input row (RowStatus). */
  get status(): Uint8Array {
    return this.problem.status;
  }
  /** For rows skipped because of x: the x column that was missing (empty when no row misses x). */
  get missingCol(): Int32Array {
    return this.problem.missingCol;
  }
  /** Input rows used in the fit (complete, weight > 0). */
  get used(): Int32Array {
    return this.problem.used;
  }
  /** Number of used rows. */
  get n(): number {
    return this.problem.n;
  }
  get cs(): Int32Array {
    return this.problem.cs;
  }
  get ys(): number {
    return this.problem.ys;
  }
  get design(): DDMatrix {
    return this.problem.design;
  }
  get yHi(): Float64Array {
    return this.problem.yHi;
  }
  get yLo(): Float64Array | null {
    return this.problem.yLo;
  }
  /** R, the kept columns and the rank decision, whichever path made them. */
  get factor(): Factor {
    return this.sol.factor;
  }
  /** The Householder factor of the design, or null on the fast path (no Q of the design exists). */
  get householder(): HouseholderQR | null {
    return this.sol.householder;
  }
  /** Which path produced the fit. */
  get method(): "normal" | "householder" {
    return this.sol.method;
  }
  /** Refined scaled coefficients for the kept columns (length rank). */
  get coefScaled(): Float64Array {
    return this.sol.coefScaled;
  }
  /** Weighted scaled residuals r̃ of the used rows. */
  get residScaled(): Float64Array {
    return this.sol.residScaled;
  }
  /** Σ r̃², scaled. */
  get rssScaled(): number {
    return this.sol.rssScaled;
  }
  /** The one exact-fit decision (tolerances.ts EXACT_FIT): every statistic, finding and function reads this. */
  get exact(): boolean {
    return this.sol.exact;
  }
  get refineSteps(): number {
    return this.sol.steps;
  }
  get refineConverged(): boolean {
    return this.sol.converged;
  }
  get rank(): number {
    return this.sol.factor.rank;
  }
  /** Number of parameters p (design columns). */
  get parameters(): number {
    return this.problem.shape.p;
  }
  /** Residual degrees of freedom: used rows − rank (never negative). */
  get residualDf(): number {
    return Math.max(0, this.n - this.rank);
  }

  /** Design column j (scaled, weighted, high parts) as a plain array of the used rows. */
  designColumn(j: number): Float64Array {
    return this.problem.designColumn(j);
  }

  /** For each design column: its position among the kept columns, or −1 if non-identifiable. */
  keptIndex(): Int32Array {
    const idx = new Int32Array(this.shape.p).fill(-1);
    this.factor.kept.forEach((c, k) => (idx[c] = k));
    return idx;
  }

  /** Number of skipped rows (missing values), and of rows with zero weight. */
  rowCounts(): { skipped: number; zeroWeight: number } {
    return this.problem.rowCounts();
  }

  // ------------------------------------------------------------------ coefficients

  /** Coefficients in the user's units, one per design column; NaN marks non-identifiable. */
  coefficients(): Float64Array {
    const b = new Float64Array(this.shape.p).fill(NaN);
    const { kept } = this.factor;
    for (let k = 0; k < kept.length; k++) {
      const j = kept[k]!;
      b[j] = scaleByPow2(this.coefScaled[k]!, this.cs[j]! - this.ys);
    }
    return b;
  }

  /**
   * The coefficients' low parts (user units, one per design column; 0 for non-identifiable ones):
   * b + δ is the least-squares solution to about κ·ε² relative. On the Householder path
   * δ = R⁻¹Q₁ᵀf with f = ỹ − r̃ − X̃b (r̃ the refined residual, so f = X̃δ lies in the column space;
   * compensated, one pass over the data); on the fast path δ = (RᵀR)⁻¹X̃ᵀ(ỹ − X̃b). Predictions use b + δ, so a prediction at a point where large coefficients cancel keeps
   * its relative accuracy.
   */
  coefficientsLow(): Float64Array {
    return this.once("coefficientsLow", () => {
      const { n, design } = this;
      const r = this.rank;
      const kept = this.factor.kept;
      const s = Float64Array.from(this.yHi);
      const comp = this.yLo ? Float64Array.from(this.yLo) : new Float64Array(n);
      const qr = this.householder;
      if (qr) {
        // f = ỹ − r̃ − X̃b with r̃ the refined residual: X̃(b* − b) exactly, in the column space
        const rr = this.residScaled;
        for (let t = 0; t < n; t++) {
          const a = s[t]!;
          const b = -rr[t]!;
          const sn = a + b;
          const bb = sn - a;
          comp[t]! += a - (sn - bb) + (b - bb);
          s[t] = sn;
        }
      }
      for (let k = 0; k < r; k++) residualUpdate(design, kept[k]!, -this.coefScaled[k]!, s, comp, n);
      let g: Float64Array;
      if (qr) {
        // δ = R⁻¹ Q₁ᵀ f: through the orthogonal factor, an error of about κ·ε of δ itself (the
        // normal equations would amplify by κ²)
        const v = new Float64Array(n);
        for (let t = 0; t < n; t++) v[t] = s[t]! + comp[t]!;
        qr.applyQt(r, v);
        g = v.slice(0, r);
        qr.solveR(r, g);
      } else {
        // fast path (condition number below about 50): δ = (RᵀR)⁻¹ X̃ᵀ r_d
        const vh = new Float64Array(n);
        const vl = new Float64Array(n);
        for (let t = 0; t < n; t++) {
          const v = s[t]! + comp[t]!;
          const u = SPLITTER * v;
          const h = u - (u - v);
          vh[t] = h;
          vl[t] = v - h;
        }
        g = new Float64Array(r);
        const dd: DD = { hi: 0, lo: 0 };
        for (let k = 0; k < r; k++) g[k] = dot2(design, kept[k]!, vh, vl, n, 0, dd).hi;
        this.factor.solveRt(r, g);
        this.factor.solveR(r, g);
      }
      const out = new Float64Array(this.shape.p);
      for (let k = 0; k < r; k++) out[kept[k]!] = scaleByPow2(g[k]!, this.cs[kept[k]!]! - this.ys);
      return out;
    });
  }

  /**
   * Dependency relation of every non-identifiable column on the kept columns before it. The
   * relation's coefficients are shown to 6 significant digits and used against the rank
   * tolerance, so three refinement steps on the augmented system are enough (DEPENDENCY_STEPS).
   */
  dependencies(): Dependency[] {
    return this.once("dependencies", () => {
      const out: Dependency[] = [];
      const { design, cs, n } = this;
      const qr = this.householder;
      for (const j of this.factor.dropped) {
        const nk = this.factor.keptBefore[j]!;
        const colHi = columnOf(design, j);
        const colNorm = nrm2(colHi, 0, n);
        if (colNorm === 0 || !qr) {
          out.push({ column: j, on: new Int32Array(0), coef: new Float64Array(0), scaled: new Float64Array(0), zero: true, remainder: 0 });
          continue;
        }
        const bLo = design.lo ? design.lo.subarray(j * n, (j + 1) * n) : null;
        const sol = nk > 0 ? refineAugmented(qr, design, nk, 1, colHi, bLo, null, { maxSteps: DEPENDENCY_STEPS }) : null;
        const on = this.factor.kept.slice(0, nk);
        const coef = new Float64Array(nk);
        for (let k = 0; k < nk; k++) coef[k] = scaleByPow2(sol!.x[k]!, cs[on[k]!]! - cs[j]!);
        const rem = sol ? nrm2(sol.r, 0, n) / colNorm : 1;
        out.push({ column: j, on, coef, scaled: sol ? sol.x : new Float64Array(0), zero: false, remainder: rem });
      }
      return out;
    });
  }

  /**
   * The data's own largest deviation from each dependency relation (user units, relative to the
   * size of the relation's terms), computed when a prediction first asks for it.
   */
  private dependencyDeviations(): Float64Array {
    return this.once("dependencyDeviations", () => {
      const deps = this.dependencies();
      const dev = new Float64Array(deps.length);
      const row = new Float64Array(this.shape.p);
      for (let t = 0; t < this.n; t++) {
        this.problem.designRow(this.spec.x, this.shape.m, this.used[t]!, row);
        deps.forEach((d, u) => {
          if (!d.zero) dev[u] = Math.max(dev[u]!, relationDeviation(d, row));
        });
      }
      return dev;
    });
  }

  /**
   * Whether a new design row (user units) breaks a dependency found in the data: its deviation
   * from the relation, relative to the size of the relation's terms, exceeds both the rank
   * decision's tolerance and the largest deviation among the used rows.
   */
  brokenDependency(row: Float64Array): Dependency | null {
    const tol = this.factor.tolerance;
    const deps = this.dependencies();
    if (deps.length === 0) return null;
    const dev = this.dependencyDeviations();
    for (let u = 0; u < deps.length; u++) {
      const d = deps[u]!;
      if (d.zero) {
        if (row[d.column] !== 0) return d;
        continue;
      }
      if (relationDeviation(d, row) > Math.max(tol, dev[u]!)) return d;
    }
    return null;
  }

  // ------------------------------------------------------------------ fitted values and residuals

  /**
   * Fitted values and residuals (unweighted, user units) for every input row whose x and y
   * are complete, including zero-weight rows; NaN for skipped rows. For used rows the residual
   * is the refined residual block r̃/√w (accurate even when the coefficients are ill-determined)
   * and the fitted value is y − residual; zero-weight rows are evaluated from the coefficients.
   */
  fittedAndResiduals(): { fitted: Float64Array; resid: Float64Array } {
    return this.once("fittedAndResiduals", () => this.computeFitted());
  }

  private computeFitted(): { fitted: Float64Array; resid: Float64Array } {
    const m = this.shape.m;
    const fitted = new Float64Array(m);
    const resid = new Float64Array(m);
    if (this.n < m) {
      fitted.fill(NaN);
      resid.fill(NaN);
    }
    const ys = this.ys;
    const sw = this.problem.sw;
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
      const { kept } = this.factor;
      for (let k = 0; k < kept.length; k++) {
        this.problem.unweightedColumn(kept[k]!, idx, colHi, colLo);
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
    return { fitted, resid };
  }

  // ------------------------------------------------------------------ covariance

  /**
   * Why the covariance is not computed for this fit (the work limit for nearly dependent designs,
   * tolerances.ts COV_AUGMENTED_MAX_WORK), or null. Every statistic built on the covariance reads
   * this first.
   */
  covarianceRefused(): NotAvailable | null {
    return this.once("covarianceRefused", () => (this.rank > 0 ? covarianceRefused(this.problem, this.sol, this.condition()) : null));
  }

  /** Refined unscaled covariance of the scaled kept design, C̃ = (X̃_Kᵀ X̃_K)⁻¹ (covariance.ts); throws LsqError when refused. */
  scaledCovariance(): Float64Array {
    return this.once("covariance", () => refinedCovariance(this.problem, this.sol, this.rank > 0 ? this.condition() : null));
  }

  /**
   * Covariance of the estimates, p × p row-major in the user's units: σ²·(XᵀWX)⁻¹ over the kept
   * columns (σ = 1 with known variances); NotAvailable for rows/columns of non-identifiable
   * parameters or when σ is not defined.
   */
  covariance(nonIdent: (j: number) => NotAvailable = nonIdentifiable): Quantity[][] {
    return covarianceTable(this, nonIdent);
  }

  // ------------------------------------------------------------------ statistics

  /** Summary statistics (computed once; callers must not modify the result). */
  statistics(): FitStatistics {
    return this.once("statistics", () => computeStatistics(this));
  }

  /** χ² goodness of fit (known uncertainties only). */
  chiSquare(): ChiSquare {
    return chiSquare(this);
  }

  /** Lack of fit against pure error (adequacy.ts), from the rows whose x repeats. */
  lackOfFit(): LackOfFit {
    return this.once("lackOfFit", () => lackOfFit(this));
  }

  /** The added-term test of curvature (adequacy.ts): one more term, tested from the existing factorization. */
  addedTerm(): AddedTerm {
    return this.once("addedTerm", () => addedTerm(this));
  }

  /** Condition number (2-norm) of the kept design with columns scaled to unit length, and the weakest direction. */
  condition(): Conditioning {
    return this.once("condition", () => conditionNumber(this.factor));
  }

  /** Parameter table at a confidence level in (0, 1). */
  parameterTable(level: number, nonIdent: (j: number) => NotAvailable = nonIdentifiable): ParameterRow[] {
    checkLevel(level);
    return parameterTable(this, level, nonIdent);
  }

  /** The two-sided critical value for intervals at `level`: t with the residual degrees of freedom, or normal with known variances. */
  critical(level: number): Quantity {
    checkLevel(level);
    return critical(this, level);
  }

  // ------------------------------------------------------------------ influence

  /** Leverage h_i of each used row (leverage.ts), length n. Cached; callers must not modify it. */
  leverageUsed(): Float64Array {
    return this.once("leverage", () => {
      // Householder path: corrected for the factor's rounding while affordable (leverage.ts), else
      // from Q; fast path (κ below about 50): from R.
      if (this.method === "householder" && this.rank > 0 && this.n * this.rank * this.rank <= LEVERAGE_REFINED_MAX_WORK) return leverageRefined(this.design, this.n, this.factor);
      return leverage(this.design, this.n, this.factor, this.householder, this.options.kernels !== false);
    });
  }

  /**
   * The hat value of a new design row in user units (the mean response's variance is σ²·h):
   * from R⁻ᵀ in double-double with the correction for the factor's rounding (leverage.ts) while
   * rows × rank² ≤ LEVERAGE_REFINED_MAX_WORK, else from the refined covariance.
   */
  hatOfNewRow(row: Float64Array): number {
    const r = this.rank;
    const kept = this.factor.kept;
    const zh = new Float64Array(r);
    const zl = new Float64Array(r);
    for (let k = 0; k < r; k++) zh[k] = scaleByPow2(row[kept[k]!]!, this.cs[kept[k]!]!);
    if (this.n * r * r <= LEVERAGE_REFINED_MAX_WORK) return hatOfRow(this.factor, this.once("hatCorrection", () => correctionMatrix(hatCorrection(this.design, this.n, this.factor), r)), zh, zl);
    return Math.max(0, quadraticForm(this.scaledCovariance(), r, zh));
  }

  /** Studentized (deleted) residual of each used row, length n; NaN where not defined. Cached. */
  studentizedUsed(): Float64Array {
    return this.once("studentized", () => studentized(this));
  }

  /** Influence measures for every input row (built on demand from the cached leverage). */
  influence(): InfluenceRow[] {
    return influenceRows(this);
  }

  // ------------------------------------------------------------------ prediction

  /**
   * Predictions at new rows of x (q × k column-major, user units, unweighted), optionally with a
   * confidence interval (mean response) or a prediction interval (a new observation, weight 1).
   */
  predict(newx: Float64Array, q: number, interval: "confidence" | "prediction" | null = null, level = 0.95, broken: (d: Dependency) => NotAvailable = brokenDefault): Prediction[] {
    checkLevel(level);
    const { k } = this.shape;
    if (newx.length !== q * k) throw new LsqError("shape", `newx must have ${k} column${k === 1 ? "" : "s"}, like x`);
    return predictions(this, newx, q, interval, level, (row) => {
      const d = this.brokenDependency(row);
      return d ? broken(d) : null;
    });
  }

  // ------------------------------------------------------------------ memory

  /** Bytes this fit keeps alive: its own arrays, the factor and every cached by-product (not the caller's y, x, weights). */
  retainedBytes(): number {
    const qr = this.householder;
    // Shared arrays count with the fit that made them while it lives; after that, here.
    const sharing = this.problem.sharesDesign && this.owner?.deref() !== undefined;
    let s = this.problem.bytesOwned(sharing) + this.sol.coefScaled.byteLength + this.sol.residScaled.byteLength;
    if (qr && !sharing) s += qr.ws ? qr.ws.memory.buffer.byteLength : qr.a.byteLength + qr.tmat.byteLength;
    else if (!qr) s += 8 * this.shape.p * this.shape.p * 4; // the fast path's p × p factor and Gram matrix
    for (const [key, v] of this.memo) if (!sharing || !DESIGN_ONLY.includes(key)) s += bytesOf(v);
    return s + 2048; // objects and small fields
  }
}

/** The relation's residual for one design row, relative to the size of its terms. */
function relationDeviation(d: Dependency, row: Float64Array): number {
  let s = row[d.column]!;
  let mag = Math.abs(s);
  for (let u = 0; u < d.on.length; u++) {
    const v = d.coef[u]! * row[d.on[u]!]!;
    s -= v;
    mag += Math.abs(v);
  }
  return mag > 0 ? Math.abs(s) / mag : 0;
}

function brokenDefault(d: Dependency): NotAvailable {
  return notAvailable(`this new row does not follow the dependency between columns found in the data (design column ${d.column + 1}), so its prediction cannot be estimated`);
}

function nonIdentifiable(j: number): NotAvailable {
  return notAvailable(`design column ${j + 1} is not identifiable (it is a combination of earlier columns)`);
}

function checkLevel(level: number): void {
  if (!(level > 0 && level < 1)) throw new LsqError("range", "the confidence level must be between 0 and 1, e.g. 0.95");
}

/** Bytes of a cached by-product: typed arrays by their length, arrays and plain objects by their parts. */
function bytesOf(v: unknown): number {
  if (ArrayBuffer.isView(v)) return v.byteLength + 64;
  if (Array.isArray(v)) return v.reduce((s: number, x) => s + bytesOf(x), 16 + 8 * v.length);
  if (v && typeof v === "object") return Object.values(v).reduce((s: number, x) => s + bytesOf(x), 64);
  return 8;
}

export { sumSquares } from "./sums";
export type { NotAvailable };
