/**
 * From spreadsheet arguments to a (cached) fit: validation with messages that say what and
 * where, orientation of row-wise data, default labels, and the reasons rows were skipped.
 *
 * Every function that fits takes the same block of arguments, in this order (README "Function
 * reference"): y, x, weights, intercept, degree — and, last of all, `weighting`, which says what
 * the weights range holds (relative weights, or standard uncertainties of y).
 */
import { LeastSquaresFit } from "../core/fit";
import { LsqError } from "../core/errors";
import { MAX_DEGREE, RowStatus } from "../core/design";
import { ContentCache } from "./cache";
import { SheetError } from "./cellerror";
import { memoryBudget } from "./budget";
import { KIND_WORDS, rangeEquals, sampleHash, readBlock, readBoolean, readNumber, readWord, shapeOf, type Block } from "./values";

/**
 * Documented size limits: above these the functions answer #VALUE! with the limit instead of
 * freezing the host. README "Size limits" gives the reasons and the measured worst times.
 */
export const LIMITS = {
  /** Rows: a worksheet's own row count (2^20), so a range can never exceed it anyway. */
  maxRows: 1_048_576,
  /** Cells in y, x and weights together. */
  maxCells: 12_000_000,
  /** Design columns (intercept + x columns or powers). */
  maxParameters: 200,
  /** Rows × parameters², a proxy for the work of one factorization. */
  maxWork: 1e9,
  /** Rows × parameters² for polynomials (degree 2 and up), whose powers are formed and refined in double-double. */
  maxPolynomialWork: 1e8,
};

/** The arguments every fitting function takes, by name (README "Function reference"). */
export interface FitArgs {
  readonly y: unknown;
  readonly x: unknown;
  readonly weights?: unknown;
  readonly intercept?: unknown;
  readonly degree?: unknown;
  readonly weighting?: unknown;
}

/** What the weights range holds. */
export type Weighting = "relative" | "uncertainty";

export interface Model {
  readonly fit: LeastSquaresFit;
  /** Labels of the design columns, intercept first. */
  readonly labels: string[];
  /** Input rows m. */
  readonly m: number;
  /** y was given as a row (results that follow y's rows are returned as a row). */
  readonly asRow: boolean;
  /** What the weights range held. */
  readonly weighting: Weighting;
  /** Why input row i (0-based) was skipped, in words; `xNames` names the x columns (default "x column 2"). */
  skipReason(i: number, xNames?: readonly string[]): string;
  /** Bytes this model keeps alive beyond its cache key (the fit and its by-products). */
  bytes(): number;
}

const cache = new ContentCache<Model | SheetError>(memoryBudget().fits, (v) => (v instanceof SheetError ? 512 : v.bytes()));

/** The fit cache (for the memory budget, tests and the benchmark). */
export function fitCache(): ContentCache<Model | SheetError> {
  return cache;
}

/** Cache statistics (for tests and the benchmark). */
export function cacheStats(): { hits: number; misses: number; size: number; bytes: number } {
  return { hits: cache.hits, misses: cache.misses, size: cache.size, bytes: cache.bytes };
}

export function clearCache(): void {
  cache.clear();
  cache.hits = 0;
  cache.misses = 0;
}

/** Default design labels: intercept, then x (one column), x1…xk, or x, x^2, …, x^d. */
export function defaultLabels(intercept: boolean, k: number, degree: number, xNames?: readonly string[]): string[] {
  const out: string[] = intercept ? ["intercept"] : [];
  if (degree >= 2) {
    const base = xNames?.[0] ?? "x";
    for (let e = 1; e <= degree; e++) out.push(e === 1 ? base : `${base}^${e}`);
  } else for (let j = 0; j < k; j++) out.push(xNames?.[j] ?? (k === 1 ? "x" : `x${j + 1}`));
  return out;
}

/** Parse the degree argument: a whole number 1…20. */
export function readDegree(v: unknown): number {
  const d = readNumber(v, "degree", 1);
  if (!Number.isInteger(d) || d < 1 || d > MAX_DEGREE) throw new SheetError("#VALUE!", `degree must be a whole number from 1 to ${MAX_DEGREE} (it is ${d})`);
  return d;
}

/** Parse the weighting argument: "relative" (default) or "uncertainty". */
export function readWeighting(v: unknown): Weighting {
  return (readWord(v, "weighting", ["relative", "uncertainty"]) as Weighting | null) ?? "relative";
}

/** Refuse inputs above the documented limits (#VALUE! with the numbers), before any work is done. */
export function checkSize(m: number, k: number, weighted: boolean, p: number, degree = 1): void {
  if (m > LIMITS.maxRows) throw new SheetError("#VALUE!", `the data have ${m} rows; the LSQ functions accept at most ${LIMITS.maxRows} (a worksheet's rows)`);
  const cells = m * (k + 1 + (weighted ? 1 : 0));
  if (cells > LIMITS.maxCells) throw new SheetError("#VALUE!", `the data hold ${cells} cells; the LSQ functions accept at most ${LIMITS.maxCells}`);
  if (p > LIMITS.maxParameters) throw new SheetError("#VALUE!", `the model has ${p} parameters; the LSQ functions accept at most ${LIMITS.maxParameters}`);
  if (m * p * p > LIMITS.maxWork) throw new SheetError("#VALUE!", `${m} rows with ${p} parameters is too much work for one cell formula (limit: rows × parameters² ≤ ${LIMITS.maxWork})`);
  if (degree >= 2 && m * p * p > LIMITS.maxPolynomialWork) throw new SheetError("#VALUE!", `${m} rows with a polynomial of degree ${degree} is too much work for one cell formula (limit for polynomials: rows × parameters² ≤ ${LIMITS.maxPolynomialWork})`);
}

/** Whether an optional range argument was left out (omitted, or a single empty cell). */
export function omitted(v: unknown): boolean {
  return v === null || v === undefined || v === "" || (Array.isArray(v) && v.length === 1 && Array.isArray(v[0]) && v[0].length === 1 && (v[0][0] === null || v[0][0] === ""));
}

/**
 * Weights from standard uncertainties u of y: w = 1/u². A missing u skips the row (NaN); a zero,
 * negative or infinite u is an error naming the row.
 */
function weightsFromUncertainties(u: Float64Array): Float64Array {
  const w = new Float64Array(u.length);
  for (let i = 0; i < u.length; i++) {
    const v = u[i]!;
    if (Number.isNaN(v)) {
      w[i] = NaN;
      continue;
    }
    if (!(v > 0)) throw new SheetError("#VALUE!", `the uncertainty in row ${i + 1} is ${v === 0 ? "zero" : "negative"}; standard uncertainties must be positive`);
    const wi = 1 / (v * v);
    if (!(wi > 0 && Number.isFinite(wi))) throw new SheetError("#VALUE!", `the uncertainty in row ${i + 1} (${v}) is too ${wi === 0 ? "large" : "small"} to use as a weight; change the units of y`);
    w[i] = wi;
  }
  return w;
}

/** Build (or fetch from the cache) the fit for these arguments. Throws SheetError. */
export function getModel(a: FitArgs): Model {
  const intercept = readBoolean(a.intercept, "intercept", true);
  const degree = readDegree(a.degree);
  const weighting = readWeighting(a.weighting);
  const ys = shapeOf(a.y, "y");
  if (ys.rows !== 1 && ys.cols !== 1) throw new SheetError("#VALUE!", `y must be a single column or a single row (it is ${ys.rows} × ${ys.cols})`);
  const yAsRow = ys.rows === 1 && ys.cols > 1;
  const m = yAsRow ? ys.cols : ys.rows;
  const xs = shapeOf(a.x, "x");
  let transpose = false;
  if (xs.rows !== m) {
    if (xs.cols === m && (yAsRow || xs.rows === 1)) transpose = true;
    else throw new SheetError("#VALUE!", `y has ${m} values but x has ${xs.rows} rows; they must match row for row`);
  }
  const k = transpose ? xs.rows : xs.cols;
  if (degree >= 2 && k !== 1) throw new SheetError("#VALUE!", `degree ${degree} needs x to be a single column, but x has ${k} columns`);
  const hasW = !omitted(a.weights);
  const wName = weighting === "uncertainty" ? "the uncertainties (weights)" : "weights";
  let wAsRow = false;
  if (hasW) {
    const ws = shapeOf(a.weights, "weights");
    if (ws.rows !== 1 && ws.cols !== 1) throw new SheetError("#VALUE!", `${wName} must be a single column or a single row (it is ${ws.rows} × ${ws.cols})`);
    wAsRow = ws.rows === 1 && ws.cols > 1;
    const mw = wAsRow ? ws.cols : ws.rows;
    if (mw !== m) throw new SheetError("#VALUE!", `${wName} has ${mw} values but y has ${m}; they must match row for row`);
  } else if (weighting === "uncertainty") throw new SheetError("#VALUE!", 'weighting is "uncertainty" but no weights range was given; put the standard uncertainties of y in the weights argument');
  const p = (intercept ? 1 : 0) + (degree >= 2 ? degree : k);
  checkSize(m, k, hasW, p, degree);

  // Look the input up by its content, read straight from the 2-D arrays: a hash of a sample of the
  // cells picks candidates and a comparison of every cell confirms a hit, so a repeated input (the
  // same ranges in several LSQ formulas) costs one pass over its cells and is not converted again.
  const yArg = a.y as unknown[][];
  const xArg = a.x as unknown[][];
  const wArg = a.weights as unknown[][];
  const design = `${intercept ? 1 : 0}|${degree}|${m}|${k}|${transpose ? 1 : 0}|${hasW ? (wAsRow ? 2 : 1) : 0}|${weighting}`;
  const flags = `${design}|${yAsRow ? 1 : 0}`;
  let h = 0x811c9dc5;
  for (let i = 0; i < design.length; i++) h = Math.imul(h ^ design.charCodeAt(i), 0x01000193);
  h = sampleHash(xArg, h);
  if (hasW) h = sampleHash(wArg, h);
  const designHash = h >>> 0;
  h = Math.imul(h ^ (yAsRow ? 7 : 3), 0x01000193);
  h = sampleHash(yArg, h);
  const hash = h >>> 0;
  const found = cache.find(hash, (key) => {
    if (key.flags !== flags) return false;
    const [yb, xb, wb] = key.blocks!;
    return rangeEquals(yArg, yb!, yAsRow) && rangeEquals(xArg, xb!, transpose) && (!hasW || rangeEquals(wArg, wb!, wAsRow));
  });
  if (found !== undefined) {
    if (found instanceof SheetError) throw found;
    return found;
  }
  // Another y over the same x and weights (several analyte columns against one set of standards):
  // its fit lends its converted x and weights, and — when the used rows are the same — its design
  // and factorization (core/fit.ts), so only the y-dependent work is done.
  const sibling = cache.scan((key, v) => !(v instanceof SheetError) && key.design === design && key.designHash === designHash && rangeEquals(xArg, key.blocks![1]!, transpose) && (!hasW || rangeEquals(wArg, key.blocks![2]!, wAsRow)));
  const y = readBlock(a.y, "y", yAsRow);
  const x = sibling ? sibling.key.blocks![1]! : readBlock(a.x, "x", transpose);
  const w = hasW ? (sibling ? sibling.key.blocks![2]! : readBlock(a.weights, "weights", wAsRow)) : null;
  const base = sibling ? (sibling.value as FitModel).fit : null;
  let value: Model | SheetError;
  try {
    const weights = w ? (weighting === "uncertainty" ? (sibling ? (sibling.value as FitModel).fit.spec.weights! : weightsFromUncertainties(w.data)) : w.data) : null;
    const fit = new LeastSquaresFit({ y: y.data, x: x.data, rows: m, cols: k, intercept, weights, degree, varianceKnown: weighting === "uncertainty" }, {}, base);
    value = new FitModel(fit, intercept, k, degree, m, yAsRow, weighting, y, x, w, weights !== w?.data ? weights : null);
  } catch (e) {
    value = toSheetError(e);
  }
  const blocks = w ? [y, x, w] : [y, x];
  // a sibling's x and weights are counted once, with the sibling
  const own = sibling ? [y] : blocks;
  const lender = sibling ? (sibling.key.lender ?? sibling.key) : undefined;
  cache.insert(hash, { numbers: own.map((b) => b.data), bytes: own.map((b) => b.kinds), flags, design, designHash, blocks, lender }, value);
  if (value instanceof SheetError) throw value;
  return value;
}

/** Measure the cache's entries again after a call computed by-products (memory budget). */
export function settleCache(): void {
  cache.settle();
}

/**
 * A fit with what the functions need around it. A class, not an object of closures: a closure
 * made inside getModel would keep getModel's whole scope — the caller's raw 2-D arguments —
 * alive for as long as the cache keeps the model (measured by scripts/soak.mjs).
 */
class FitModel implements Model {
  readonly labels: string[];
  constructor(
    readonly fit: LeastSquaresFit,
    intercept: boolean,
    private readonly k: number,
    degree: number,
    readonly m: number,
    readonly asRow: boolean,
    readonly weighting: Weighting,
    private readonly y: Block,
    private readonly x: Block,
    private readonly w: Block | null,
    private readonly ownWeights: Float64Array | null,
  ) {
    this.labels = defaultLabels(intercept, k, degree);
  }

  skipReason(i: number, xNames?: readonly string[]): string {
    const { fit, k, m, y, x, w } = this;
    const st = fit.status[i];
    if (st === RowStatus.MissingY) return `y is ${KIND_WORDS[y.kinds[i]!]}`;
    if (st === RowStatus.MissingX) {
      const c = fit.missingCol[i]!;
      return `${xNames?.[c] ?? (k === 1 ? "x" : `x column ${c + 1}`)} is ${KIND_WORDS[x.kinds[c * m + i]!]}`;
    }
    if (st === RowStatus.MissingWeight && w) return `${this.weighting === "uncertainty" ? "the uncertainty" : "the weight"} is ${KIND_WORDS[w.kinds[i]!]}`;
    if (st === RowStatus.ZeroWeight) return "the weight is zero";
    return "";
  }

  bytes(): number {
    return this.fit.retainedBytes() + (this.ownWeights ? this.ownWeights.byteLength : 0) + 64 * this.labels.length + 512;
  }
}

/** Map a core or unexpected error to one spreadsheet error (never throws itself). */
export function toSheetError(e: unknown): SheetError {
  if (e instanceof SheetError) return e;
  if (e instanceof LsqError) return new SheetError("#VALUE!", e.message);
  let msg = "an unknown error";
  try {
    const m = e && typeof e === "object" ? (e as { message?: unknown }).message : undefined;
    msg = typeof m === "string" ? m : typeof e === "string" ? e : Object.prototype.toString.call(e);
  } catch {
    // a value whose description itself throws: keep the generic words
  }
  if (e instanceof RangeError && /allocation|memory|array length/i.test(msg)) return new SheetError("#N/A", "not enough memory for this calculation; use fewer rows or columns");
  return new SheetError("#VALUE!", `unexpected problem: ${String(msg).slice(0, 160)}`);
}

/** Throw #N/A when there are fewer usable rows than parameters. */
export function requireEnoughRows(model: Model): void {
  const { fit } = model;
  if (fit.n === 0) throw new SheetError("#N/A", "no row has a usable y and x (and positive weight); check that the ranges hold numbers");
  if (fit.n < fit.parameters) throw new SheetError("#N/A", `only ${fit.n} usable row${fit.n === 1 ? "" : "s"} for ${fit.parameters} parameters; add rows or use fewer columns (LSQ.CHECK explains)`);
}
