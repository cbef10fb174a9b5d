/**
 * From spreadsheet arguments to a (cached) fit: validation with messages that say what and
 * where, orientation of row-wise data, default labels, and the reasons rows were skipped.
 */
import { LeastSquaresFit } from "../core/fit";
import { LsqError } from "../core/errors";
import { MAX_DEGREE, RowStatus } from "../core/design";
import { ContentCache } from "./cache";
import { SheetError, type ErrorCodeText } from "./cellerror";
import { KIND_WORDS, rangeEquals, sampleHash, readBlock, readBoolean, readNumber, shapeOf, type Block } from "./values";

/** Documented size limits: above these the functions answer #NUM! instead of freezing the host. */
export const LIMITS = {
  /** Cells in y, x and weights together. */
  maxCells: 12_000_000,
  /** Design columns (intercept + x columns or powers). */
  maxParameters: 200,
  /** Rows × parameters², a proxy for the work of one factorization. */
  maxWork: 1e9,
};

export interface Model {
  readonly fit: LeastSquaresFit;
  /** Labels of the design columns, intercept first. */
  readonly labels: string[];
  /** Input rows m. */
  readonly m: number;
  /** y was given as a row (results that follow y's rows are returned as a row). */
  readonly asRow: boolean;
  /** Why input row i (0-based) was skipped, in words; `xNames` names the x columns (default "x column 2"). */
  skipReason(i: number, xNames?: readonly string[]): string;
}

const cache = new ContentCache<Model | SheetError>(32);

/** Cache statistics (for tests and the benchmark). */
export function cacheStats(): { hits: number; misses: number; size: number } {
  return { hits: cache.hits, misses: cache.misses, size: cache.size };
}

export function clearCache(): void {
  cache.clear();
  cache.hits = 0;
  cache.misses = 0;
}

/** Default design labels: intercept, then x (one column), x1…xk, or x, x², …, x^d. */
export function defaultLabels(intercept: boolean, k: number, degree: number, xNames?: readonly string[]): string[] {
  const out: string[] = intercept ? ["intercept"] : [];
  if (degree >= 2) {
    const base = xNames?.[0] ?? "x";
    for (let e = 1; e <= degree; e++) out.push(e === 1 ? base : `${base}${superscript(e)}`);
  } else for (let j = 0; j < k; j++) out.push(xNames?.[j] ?? (k === 1 ? "x" : `x${j + 1}`));
  return out;
}

function superscript(n: number): string {
  const sup = "⁰¹²³⁴⁵⁶⁷⁸⁹";
  return String(n)
    .split("")
    .map((d) => sup[Number(d)])
    .join("");
}

/** Parse the degree argument: a whole number 1…20. */
export function readDegree(v: unknown): number {
  const d = readNumber(v, "degree", 1);
  if (!Number.isInteger(d) || d < 1 || d > MAX_DEGREE) throw new SheetError("#NUM!", `degree must be a whole number from 1 to ${MAX_DEGREE} (it is ${d})`);
  return d;
}

/** Refuse inputs above the documented limits (#NUM! with the numbers), before any work is done. */
export function checkSize(m: number, k: number, weighted: boolean, p: number): void {
  const cells = m * (k + 1 + (weighted ? 1 : 0));
  if (cells > LIMITS.maxCells) throw new SheetError("#NUM!", `the ranges hold ${cells} cells; the LSQ functions accept at most ${LIMITS.maxCells}`);
  if (p > LIMITS.maxParameters) throw new SheetError("#NUM!", `the model has ${p} parameters; the LSQ functions accept at most ${LIMITS.maxParameters}`);
  if (m * p * p > LIMITS.maxWork) throw new SheetError("#NUM!", `${m} rows with ${p} parameters is too much work for one cell formula (limit: rows × parameters² ≤ ${LIMITS.maxWork})`);
}

/** Build (or fetch from the cache) the fit for these arguments. Throws SheetError. */
export function getModel(yArg: unknown, xArg: unknown, interceptArg: unknown, weightsArg: unknown, degreeArg: unknown): Model {
  const intercept = readBoolean(interceptArg, "intercept", true);
  const degree = readDegree(degreeArg);
  const ys = shapeOf(yArg, "y");
  if (ys.rows !== 1 && ys.cols !== 1) throw new SheetError("#VALUE!", `y must be a single column or a single row (it is ${ys.rows} × ${ys.cols})`);
  const yAsRow = ys.rows === 1 && ys.cols > 1;
  const m = yAsRow ? ys.cols : ys.rows;
  const xs = shapeOf(xArg, "x");
  let transpose = false;
  if (xs.rows !== m) {
    if (xs.cols === m && (yAsRow || xs.rows === 1)) transpose = true;
    else throw new SheetError("#VALUE!", `y has ${m} values but x has ${xs.rows} rows; they must match row for row`);
  }
  const k = transpose ? xs.rows : xs.cols;
  if (degree >= 2 && k !== 1) throw new SheetError("#VALUE!", `degree ${degree} needs x to be a single column, but x has ${k} columns`);
  const hasW = !(weightsArg === null || weightsArg === undefined || (Array.isArray(weightsArg) && weightsArg.length === 1 && Array.isArray(weightsArg[0]) && weightsArg[0].length === 1 && (weightsArg[0][0] === null || weightsArg[0][0] === "")));
  let wAsRow = false;
  if (hasW) {
    const ws = shapeOf(weightsArg, "weights");
    if (ws.rows !== 1 && ws.cols !== 1) throw new SheetError("#VALUE!", `weights must be a single column or a single row (it is ${ws.rows} × ${ws.cols})`);
    wAsRow = ws.rows === 1 && ws.cols > 1;
    const mw = wAsRow ? ws.cols : ws.rows;
    if (mw !== m) throw new SheetError("#VALUE!", `weights has ${mw} values but y has ${m}; they must match row for row`);
  }
  const p = (intercept ? 1 : 0) + (degree >= 2 ? degree : k);
  checkSize(m, k, hasW, p);

  // Look the input up by its content, read straight from the 2-D arrays: a hash of a sample of the
  // cells picks candidates and a comparison of every cell confirms a hit, so a repeated input (the
  // same ranges in several LSQ formulas) costs one pass over its cells and is not converted again.
  const flags = `${intercept ? 1 : 0}|${degree}|${m}|${k}|${transpose ? 1 : 0}|${yAsRow ? 1 : 0}|${hasW ? (wAsRow ? 2 : 1) : 0}`;
  let h = 0x811c9dc5;
  for (let i = 0; i < flags.length; i++) h = Math.imul(h ^ flags.charCodeAt(i), 0x01000193);
  h = sampleHash(yArg as unknown[][], h);
  h = sampleHash(xArg as unknown[][], h);
  if (hasW) h = sampleHash(weightsArg as unknown[][], h);
  const hash = h >>> 0;
  const found = cache.find(hash, (key) => {
    if (key.flags !== flags) return false;
    const [yb, xb, wb] = key.blocks!;
    return rangeEquals(yArg as unknown[][], yb!, yAsRow) && rangeEquals(xArg as unknown[][], xb!, transpose) && (!hasW || rangeEquals(weightsArg as unknown[][], wb!, wAsRow));
  });
  if (found !== undefined) {
    if (found instanceof SheetError) throw found;
    return found;
  }
  const y = readBlock(yArg, "y", yAsRow);
  const x = readBlock(xArg, "x", transpose);
  const w = hasW ? readBlock(weightsArg, "weights", wAsRow) : null;
  let value: Model | SheetError;
  try {
    const fit = new LeastSquaresFit({ y: y.data, x: x.data, rows: m, cols: k, intercept, weights: w ? w.data : null, degree });
    value = makeModel(fit, intercept, k, degree, m, yAsRow, y, x, w);
  } catch (e) {
    value = toSheetError(e);
  }
  const blocks = w ? [y, x, w] : [y, x];
  cache.insert(hash, { numbers: blocks.map((b) => b.data), bytes: blocks.map((b) => b.kinds), flags, blocks }, value);
  if (value instanceof SheetError) throw value;
  return value;
}

function makeModel(fit: LeastSquaresFit, intercept: boolean, k: number, degree: number, m: number, asRow: boolean, y: Block, x: Block, w: Block | null): Model {
  const labels = defaultLabels(intercept, k, degree);
  return {
    fit,
    labels,
    m,
    asRow,
    skipReason(i: number, xNames?: readonly string[]): string {
      const st = fit.status[i];
      if (st === RowStatus.MissingY) return `y is ${KIND_WORDS[y.kinds[i]!]}`;
      if (st === RowStatus.MissingX) {
        const c = fit.missingCol[i]!;
        return `${xNames?.[c] ?? (k === 1 ? "x" : `x column ${c + 1}`)} is ${KIND_WORDS[x.kinds[c * m + i]!]}`;
      }
      if (st === RowStatus.MissingWeight && w) return `the weight is ${KIND_WORDS[w.kinds[i]!]}`;
      if (st === RowStatus.ZeroWeight) return "the weight is zero";
      return "";
    },
  };
}

/** Map a core or unexpected error to one spreadsheet error. */
export function toSheetError(e: unknown): SheetError {
  if (e instanceof SheetError) return e;
  if (e instanceof LsqError) {
    const code: ErrorCodeText = e.kind === "range" ? "#NUM!" : e.kind === "shape" ? "#VALUE!" : "#N/A";
    return new SheetError(code, e.message);
  }
  const msg = e instanceof Error ? e.message : String(e);
  return new SheetError("#VALUE!", `unexpected problem: ${msg}`);
}

/** Throw #N/A when there are fewer usable rows than parameters. */
export function requireEnoughRows(model: Model): void {
  const { fit } = model;
  if (fit.n === 0) throw new SheetError("#N/A", "no row has a usable y and x (and positive weight); check that the ranges hold numbers");
  if (fit.n < fit.parameters) throw new SheetError("#N/A", `only ${fit.n} usable row${fit.n === 1 ? "" : "s"} for ${fit.parameters} parameters; add rows or use fewer columns (LSQ.CHECK explains)`);
}

