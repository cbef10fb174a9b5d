/**
 * What each LSQ formula last computed, by calling-cell address, for the task pane. The functions
 * and the pane run in one JavaScript context (the shared runtime), so the registry lives on
 * globalThis.
 *
 * It keeps what the pane needs and no more (README "Memory and time"): the function, the calling
 * cell and the argument addresses; the scalar arguments and small ranges (at most SMALL_CELLS
 * cells each; larger ranges the pane reads again by address); and a weak reference to the fit, so
 * the pane reuses it while the fit cache still holds it but never keeps it alive. Only calls whose
 * arguments passed validation are recorded. The store is bounded by its own measured bytes; the
 * oldest addresses are dropped first.
 */

/** Ranges up to this many cells are kept in the record; larger ones only by address. */
export const SMALL_CELLS = 256;

export interface FormulaRecord {
  /** Function id, e.g. "COEF". */
  readonly fn: string;
  /** Calling cell, e.g. "Sheet1!F2". */
  readonly address: string;
  /** Addresses of the arguments, in parameter order (empty strings where unknown). */
  readonly parameterAddresses: readonly string[];
  /** Arguments by parameter name: scalars and small ranges as given; larger ranges are null (read them by address). */
  readonly args: Readonly<Record<string, unknown>>;
  /** Names of the arguments that were ranges too large to keep. */
  readonly dropped: readonly string[];
  /** The result object of the call (a fit), while something else keeps it alive. */
  readonly ref: { deref(): object | undefined } | null;
  /** Rows whose zeros may be empty cells the host could not confirm (blanks.ts). */
  readonly possibleBlanks?: { rows: number[]; columns: string[] };
  /** Time of the call (ms since epoch). */
  readonly at: number;
}

const MAX_RECORDS = 2000;
let maxBytes = 4 * 1024 * 1024;
const KEY = "__colspaceFormulaRegistry";

interface Store {
  readonly map: Map<string, { rec: FormulaRecord; bytes: number }>;
  bytes: number;
}

function store(): Store {
  const g = globalThis as unknown as Record<string, Store | undefined>;
  let s = g[KEY];
  if (!s) {
    s = { map: new Map(), bytes: 0 };
    g[KEY] = s;
  }
  return s;
}

/** Bytes of a kept value: 16 per number cell, 2 per character, 56 per array (V8's small-object sizes, rounded up). */
function bytesOf(v: unknown): number {
  if (typeof v === "string") return 24 + 2 * v.length;
  if (Array.isArray(v)) {
    let s = 56 + 8 * v.length;
    for (const c of v) s += bytesOf(c);
    return s;
  }
  if (v && typeof v === "object") return 64;
  return 16;
}

/** Cells in a 2-D range argument, from its first row only (shape checks ran before recording). */
function cellsOf(v: unknown): number {
  if (!Array.isArray(v)) return 0;
  const first: unknown = v.length > 0 ? v[0] : null;
  return v.length * (Array.isArray(first) ? first.length : 1);
}

const weakRef = (o: object): FormulaRecord["ref"] => {
  const W = (globalThis as { WeakRef?: new (o: object) => { deref(): object | undefined } }).WeakRef;
  return W ? new W(o) : null;
};

/**
 * Record a call. `args` are the validated arguments by name; ranges above SMALL_CELLS cells are
 * replaced by null (and named in `dropped`).
 */
export function recordCall(fn: string, address: string, parameterAddresses: readonly unknown[], args: Record<string, unknown>, result: object | null, possibleBlanks?: { rows: number[]; columns: string[] }): void {
  if (typeof address !== "string" || address === "") return;
  const kept: Record<string, unknown> = {};
  const dropped: string[] = [];
  for (const [name, v] of Object.entries(args)) {
    if (Array.isArray(v) && cellsOf(v) > SMALL_CELLS) {
      kept[name] = null;
      dropped.push(name);
    } else kept[name] = v;
  }
  const addrs = Array.from({ length: Math.min(32, parameterAddresses.length) }, (_, i) => {
    const a = parameterAddresses[i];
    return typeof a === "string" ? a.slice(0, 300) : "";
  });
  const blanks = possibleBlanks ? { rows: possibleBlanks.rows.slice(0, 200), columns: possibleBlanks.columns } : undefined;
  const rec: FormulaRecord = { fn, address: address.slice(0, 300), parameterAddresses: addrs, args: kept, dropped, ref: result ? weakRef(result) : null, possibleBlanks: blanks, at: Date.now() };
  const bytes = 200 + (blanks ? 16 * blanks.rows.length + 64 : 0) + bytesOf(rec.address) + addrs.reduce((s, a) => s + bytesOf(a), 0) + Object.values(kept).reduce((s: number, v) => s + bytesOf(v), 0);
  const s = store();
  const old = s.map.get(rec.address);
  if (old) {
    s.bytes -= old.bytes;
    s.map.delete(rec.address);
  }
  s.map.set(rec.address, { rec, bytes });
  s.bytes += bytes;
  while (s.map.size > 1 && (s.map.size > MAX_RECORDS || s.bytes > maxBytes)) {
    const [oldest, entry] = s.map.entries().next().value!;
    s.bytes -= entry.bytes;
    s.map.delete(oldest);
  }
}

/** Bytes the registry accounts for now, and its record count. */
export function registryStats(): { bytes: number; records: number; budget: number } {
  const s = store();
  return { bytes: s.bytes, records: s.map.size, budget: maxBytes };
}

/** Set the registry's byte budget (the add-in's memory budget, budget.ts). */
export function setRegistryBudget(bytes: number): void {
  maxBytes = bytes;
}

/** Normalize an address for lookup: drop quotes and $ signs, upper-case. */
export function normalizeAddress(a: string): string {
  return a.replace(/\$/g, "").replace(/'/g, "").toUpperCase();
}

/** The record whose calling cell is `address` (sheet-qualified), if any. */
export function lookup(address: string): FormulaRecord | undefined {
  const want = normalizeAddress(address);
  for (const { rec } of store().map.values()) if (normalizeAddress(rec.address) === want) return rec;
  return undefined;
}
