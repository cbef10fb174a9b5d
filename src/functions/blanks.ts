/**
 * Empty cells passed as 0. Some desktop builds of the host hand an empty cell inside a range to a
 * custom function as 0, and no requirement set tells the two apart (office-js issues #4702 and
 * #5262). Before a call uses a range argument that holds zeros and has a worksheet address, the
 * functions ask the workbook which of those cells are empty (Excel API `Range.valueTypes`, which
 * the shared runtime may call; DEVELOPERS.md "Host requirements") and treat those as empty —
 * skipped like any other missing value. Answers are cached by address and by where the zeros are,
 * so a recalculation with the same zeros costs nothing more. Where the host cannot answer, the
 * call goes ahead with the zeros, and CHECK and the pane say which rows may hold empty cells.
 */
import { SIGNATURES } from "./signatures";

/** Range arguments whose cells feed a fit (a zero there may be an empty cell). */
const RANGE_ARGS = ["y", "x", "weights", "newx", "newy", "uy", "ux", "correlation"];

export interface BlankHost {
  /** For each cell of the range at `address`: is it empty? (null: the host cannot say) */
  emptyCells(address: string): Promise<boolean[][] | null>;
}

/** The workbook as a BlankHost, when the Excel API is there (the shared runtime), else null. */
export function excelBlankHost(): BlankHost | null {
  const X = (globalThis as { Excel?: { run?: unknown } }).Excel;
  if (!X || typeof X.run !== "function") return null;
  const run = X.run as <T>(f: (ctx: ExcelContext) => Promise<T>) => Promise<T>;
  return {
    async emptyCells(address: string): Promise<boolean[][] | null> {
      const i = address.lastIndexOf("!");
      if (i < 0) return null;
      const sheet = address.slice(0, i).replace(/^'(.*)'$/, "$1").replace(/''/g, "'");
      const local = address.slice(i + 1);
      return run(async (ctx) => {
        const r = ctx.workbook.worksheets.getItem(sheet).getRange(local);
        r.load("valueTypes");
        await ctx.sync();
        return r.valueTypes.map((row) => row.map((t) => t === "Empty"));
      });
    },
  };
}

interface ExcelContext {
  workbook: { worksheets: { getItem(name: string): { getRange(a: string): { load(p: string): void; valueTypes: string[][] } } } };
  sync(): Promise<void>;
}

let host: BlankHost | null | undefined;
/** The host used for the check (tests set their own). */
export function setBlankHost(h: BlankHost | null): void {
  host = h;
}
function currentHost(): BlankHost | null {
  return host === undefined ? excelBlankHost() : host;
}

/** Positions (row·cols + col) of exact zeros in a 2-D array, or null when there are none. */
function zerosOf(v: unknown[][]): number[] | null {
  let out: number[] | null = null;
  const cols = v.length > 0 && Array.isArray(v[0]) ? v[0].length : 0;
  for (let i = 0; i < v.length; i++) {
    const row = v[i]!;
    for (let j = 0; j < row.length; j++)
      if (row[j] === 0) {
        if (!out) out = [];
        out.push(i * cols + j);
      }
  }
  return out;
}

/** Answers by address and zero positions (bounded). */
const answers = new Map<string, number[]>();
const MAX_ANSWERS = 256;

/** What a call needs checked: the range arguments with zeros and an address. */
export interface BlankPlan {
  readonly checks: { name: string; address: string; zeros: number[]; rows: number; cols: number }[];
}

export function blankPlan(fn: string, args: Record<string, unknown>, invocation: unknown): BlankPlan {
  const names = SIGNATURES[fn] ?? [];
  const addrs = invocation && typeof invocation === "object" ? (invocation as { parameterAddresses?: unknown }).parameterAddresses : null;
  const checks: BlankPlan["checks"] = [];
  if (!Array.isArray(addrs)) return { checks };
  for (const name of RANGE_ARGS) {
    const v = args[name];
    const at = names.indexOf(name);
    const address = at >= 0 ? addrs[at] : null;
    if (!Array.isArray(v) || typeof address !== "string" || address === "" || !address.includes("!")) continue;
    const zeros = zerosOf(v as unknown[][]);
    if (zeros) checks.push({ name, address, zeros, rows: (v as unknown[][]).length, cols: zeros.length > 0 && Array.isArray((v as unknown[][])[0]) ? ((v as unknown[][])[0] as unknown[]).length : 0 });
  }
  return { checks };
}

/**
 * Ask the host about the planned zeros and return the arguments with empty cells as null (new
 * arrays: the caller's are never changed), or null when the host cannot answer.
 */
export async function resolveBlanks(plan: BlankPlan, args: Record<string, unknown>): Promise<{ args: Record<string, unknown>; empties: number } | null> {
  const h = currentHost();
  if (!h) return null;
  const out: Record<string, unknown> = { ...args };
  let empties = 0;
  for (const c of plan.checks) {
    const key = `${c.address}|${c.zeros.join(",")}`;
    let empty = answers.get(key);
    if (!empty) {
      let mask: boolean[][] | null = null;
      try {
        mask = await h.emptyCells(c.address);
      } catch {
        mask = null;
      }
      if (!mask) return null;
      const v = args[c.name] as unknown[][];
      const cols = v.length > 0 ? v[0]!.length : 0;
      empty = c.zeros.filter((p) => mask![Math.floor(p / cols)]?.[p % cols] === true);
      answers.set(key, empty);
      if (answers.size > MAX_ANSWERS) answers.delete(answers.keys().next().value!);
    }
    if (empty.length === 0) continue;
    const v = args[c.name] as unknown[][];
    const cols = v[0]!.length;
    const copy = v.map((row) => row.slice());
    for (const p of empty) copy[Math.floor(p / cols)]![p % cols] = null;
    out[c.name] = copy;
    empties += empty.length;
  }
  return { args: out, empties };
}

/**
 * Rows of y, x and the weights holding zeros that may be empty cells, for CHECK and the pane when
 * the host could not be asked: 1-based rows and the names of the arguments they are in.
 */
export function possibleBlanks(plan: BlankPlan): { rows: number[]; columns: string[] } | undefined {
  const rows = new Set<number>();
  const columns: string[] = [];
  for (const c of plan.checks) {
    if (!["y", "x", "weights"].includes(c.name)) continue;
    columns.push(c.name);
    // the data row of each zero: its range row, or its column when the range is a single row
    for (const p of c.zeros) rows.add((c.rows === 1 ? p : Math.floor(p / c.cols)) + 1);
  }
  if (columns.length === 0) return undefined;
  return { rows: [...rows].sort((a, b) => a - b), columns };
}
