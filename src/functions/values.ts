/**
 * Spreadsheet values in: 2-D arrays from the host → column-major Float64Array.
 *
 * Missing-data rule: an empty cell (null or ""), text, a boolean or an error value (such as
 * #N/A) is "missing" and its row is skipped. NaN (which no host sends) is also missing. Some
 * hosts pass an empty cell inside a range as 0; to mark a missing value reliably, type text
 * (e.g. "n/a") or use =NA().
 */
import { SheetError } from "./cellerror";

/** Kinds of cell content, stored per cell so messages can say why a row was skipped. */
export enum CellKind {
  Number = 0,
  Empty = 1,
  Text = 2,
  Boolean = 3,
  Error = 4,
  NotANumber = 5,
}

export const KIND_WORDS = ["a number", "empty", "text", "TRUE/FALSE", "an error value", "not a number"] as const;

export interface Block {
  /** Rows and columns after orientation. */
  readonly rows: number;
  readonly cols: number;
  /** Values, column-major (rows × cols); NaN for missing. */
  readonly data: Float64Array;
  /** Cell kinds, same layout; empty (length 0) when every cell is an ordinary number. */
  readonly kinds: Uint8Array;
}

const NO_KINDS = new Uint8Array(0);

/**
 * Most cells one range argument may hold (the documented input limit, README "Size limits"). Shape
 * checks compare lengths with it before walking anything, so a hostile array with billions of
 * empty slots is refused at once.
 */
export const MAX_RANGE_CELLS = 12_000_000;

/** Check that v is a non-empty rectangular 2-D array; returns its size. */
export function shapeOf(v: unknown, name: string): { rows: number; cols: number } {
  if (!Array.isArray(v)) throw new SheetError("#VALUE!", `${name} must be a range or an array`);
  const rows = v.length;
  if (rows === 0) throw new SheetError("#VALUE!", `${name} is empty`);
  if (rows > MAX_RANGE_CELLS) throw new SheetError("#VALUE!", `${name} has ${rows} rows; the LSQ functions accept at most ${MAX_RANGE_CELLS} cells`);
  const first: unknown = v[0];
  if (Array.isArray(first) && rows * first.length > MAX_RANGE_CELLS) throw new SheetError("#VALUE!", `${name} has ${rows} × ${first.length} cells; the LSQ functions accept at most ${MAX_RANGE_CELLS}`);
  let cols = -1;
  for (let i = 0; i < rows; i++) {
    const r: unknown = v[i];
    if (!Array.isArray(r)) throw new SheetError("#VALUE!", `${name} must be a range or an array (row ${i + 1} is not a row of cells)`);
    if (cols < 0) cols = r.length;
    else if (r.length !== cols) throw new SheetError("#VALUE!", `${name} has rows of different lengths (row ${i + 1} has ${r.length} cells, row 1 has ${cols})`);
  }
  if (cols === 0) throw new SheetError("#VALUE!", `${name} is empty`);
  return { rows, cols };
}

/**
 * Read a rectangular range into column-major storage in one pass, with no allocation per row or
 * per cell. `transpose` reads the range as its transpose (predictors laid out in rows).
 */
export function readBlock(v: unknown, name: string, transpose = false): Block {
  const { rows: r0, cols: c0 } = shapeOf(v, name);
  const rows = transpose ? c0 : r0;
  const cols = transpose ? r0 : c0;
  const data = new Float64Array(rows * cols);
  let kinds = NO_KINDS; // allocated at the first cell that is not an ordinary number
  const arr = v as unknown[][];
  for (let i = 0; i < r0; i++) {
    const row = arr[i]!;
    for (let j = 0; j < c0; j++) {
      const c = row[j];
      // Element (i, j) of the range is element (i, j) of the block, or (j, i) when transposed.
      const at = transpose ? i * rows + j : j * rows + i;
      if (typeof c === "number" && c === c) {
        data[at] = c;
        continue;
      }
      data[at] = NaN;
      if (kinds.length === 0) kinds = new Uint8Array(rows * cols); // CellKind.Number = 0
      kinds[at] =
        typeof c === "number"
          ? CellKind.NotANumber
          : c === null || c === undefined || c === ""
            ? CellKind.Empty
            : typeof c === "string"
              ? CellKind.Text
              : typeof c === "boolean"
                ? CellKind.Boolean
                : CellKind.Error;
    }
  }
  return { rows, cols, data, kinds };
}

/** A scalar argument: unwrap a 1×1 array (hosts may pass a single cell that way). */
function scalar(v: unknown): unknown {
  while (Array.isArray(v)) {
    if (v.length !== 1) return v;
    v = v[0];
  }
  return v;
}

export function readBoolean(v: unknown, name: string, dflt: boolean): boolean {
  const s = scalar(v);
  if (s === null || s === undefined || s === "") return dflt;
  if (typeof s === "boolean") return s;
  if (typeof s === "number" && Number.isFinite(s)) return s !== 0;
  if (typeof s === "string") {
    const t = s.trim().toUpperCase();
    if (t === "TRUE") return true;
    if (t === "FALSE") return false;
  }
  throw new SheetError("#VALUE!", `${name} must be TRUE or FALSE`);
}

export function readNumber(v: unknown, name: string, dflt: number): number {
  const s = scalar(v);
  if (s === null || s === undefined || s === "") return dflt;
  if (typeof s === "number") {
    if (!Number.isFinite(s)) throw new SheetError("#VALUE!", `${name} must be a finite number`);
    return s;
  }
  if (typeof s === "string" && s.trim() !== "" && Number.isFinite(Number(s))) return Number(s);
  throw new SheetError("#VALUE!", `${name} must be a number`);
}

export function readWord(v: unknown, name: string, allowed: readonly string[]): string | null {
  const s = scalar(v);
  if (s === null || s === undefined || s === "") return null;
  if (typeof s !== "string") throw new SheetError("#VALUE!", `${name} must be one of the words ${allowed.map((a) => `"${a}"`).join(" or ")}`);
  const t = s.trim().toLowerCase();
  if (!allowed.includes(t)) throw new SheetError("#VALUE!", `${name} must be ${allowed.map((a) => `"${a}"`).join(" or ")}, not "${s.slice(0, 40)}"`);
  return t;
}

const scratch = new Float64Array(1);
const scratchBits = new Uint32Array(scratch.buffer);

/** The kind of a cell that is not an ordinary number. */
function kindOf(c: unknown): CellKind {
  if (typeof c === "number") return c === c ? CellKind.Number : CellKind.NotANumber;
  if (c === null || c === undefined || c === "") return CellKind.Empty;
  if (typeof c === "string") return CellKind.Text;
  if (typeof c === "boolean") return CellKind.Boolean;
  return CellKind.Error;
}

/** Cells read by `sampleHash`, at most (evenly spaced through the range, corners included). */
export const HASH_SAMPLE = 4096;

/**
 * FNV-1a hash of a sample of a rectangular range's content as readBlock would store it (each
 * sampled cell's 64-bit value and its kind), mixed into `h`, read straight from the 2-D array.
 * It only picks candidates: a cache hit is always confirmed by `rangeEquals` over every cell, so
 * two ranges that differ only in unsampled cells never share a result, and the one full pass over
 * the arguments on a hit is that comparison.
 */
export function sampleHash(v: unknown[][], h: number): number {
  const rows = v.length;
  const cols = rows > 0 ? v[0]!.length : 0;
  const n = rows * cols;
  const step = Math.max(1, Math.floor(n / HASH_SAMPLE));
  for (let t = 0; t < n; t += step) h = mixCell(v[Math.floor(t / cols)]![t % cols], h);
  if (n > 0) h = mixCell(v[rows - 1]![cols - 1], h);
  return h;
}

function mixCell(c: unknown, h: number): number {
  if (typeof c === "number" && c === c) {
    scratch[0] = c;
    h = Math.imul(h ^ scratchBits[0]!, 0x01000193);
    return Math.imul(h ^ scratchBits[1]!, 0x01000193);
  }
  return Math.imul(h ^ (0x100 + kindOf(c)), 0x01000193);
}

/**
 * Does the 2-D array hold exactly what `b` stores (value bits and kinds; transposed as readBlock)?
 * A number cell matches when it equals the stored value (a stored missing cell is NaN, so equality
 * also proves the stored kind is a number) and, for zeros, has the same sign; any other cell must
 * have the stored kind. The common case — equal nonzero numbers — costs one comparison per cell.
 */
export function rangeEquals(v: unknown[][], b: Block, transpose: boolean): boolean {
  const rows = b.rows;
  const data = b.data;
  // Element (i, j) of the range is element (i, j) of the block, or (j, i) when transposed.
  const stride = transpose ? 1 : rows;
  for (let i = 0; i < v.length; i++) {
    const row = v[i]!;
    const n = row.length;
    const at0 = transpose ? i * rows : i;
    for (let j = 0, at = at0; j < n; j++, at += stride) {
      const c = row[j];
      if (c !== data[at] || c === 0) {
        if (!sameCell(c, b, at)) return false;
      }
    }
  }
  return true;
}

/** rangeEquals for one cell that is not an equal nonzero number. */
function sameCell(c: unknown, b: Block, at: number): boolean {
  const d = b.data[at]!;
  if (c === d) return 1 / (c as number) === 1 / d; // equal zeros: same sign
  if (typeof c === "number" && c === c) return false; // a different number
  return b.kinds.length > 0 && b.kinds[at] === kindOf(c); // (no kinds stored: every stored cell was a number)
}
