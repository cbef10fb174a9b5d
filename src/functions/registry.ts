/**
 * What each LSQ formula last computed, by calling-cell address, for the task pane. In the
 * shared runtime the functions and the pane run in one JavaScript context but in separate
 * bundles, so the registry lives on globalThis. Bounded by record count and by the total cells
 * of the arguments it keeps alive: the oldest addresses are dropped first.
 */
export interface FormulaRecord {
  /** Function id, e.g. "COEF". */
  readonly fn: string;
  /** Calling cell, e.g. "Sheet1!F2". */
  readonly address: string;
  /** Addresses of the arguments, in parameter order (empty strings where unknown). */
  readonly parameterAddresses: readonly string[];
  /** The raw arguments (read-only; never mutated). */
  readonly args: readonly unknown[];
  /** Time of the call (ms since epoch). */
  readonly at: number;
}

const MAX_RECORDS = 500;
/** Cells of argument arrays kept across all records. */
const MAX_CELLS = 20_000_000;
const KEY = "__colspaceFormulaRegistry";

interface Store {
  readonly map: Map<string, { rec: FormulaRecord; cells: number }>;
  cells: number;
}

function store(): Store {
  const g = globalThis as unknown as Record<string, Store | undefined>;
  let s = g[KEY];
  if (!s) {
    s = { map: new Map(), cells: 0 };
    g[KEY] = s;
  }
  return s;
}

function cellsOf(args: readonly unknown[]): number {
  let n = 0;
  for (const a of args) if (Array.isArray(a)) for (const row of a) n += Array.isArray(row) ? row.length : 1;
  return n;
}

export function recordCall(rec: FormulaRecord): void {
  if (!rec.address) return;
  const s = store();
  const old = s.map.get(rec.address);
  if (old) {
    s.cells -= old.cells;
    s.map.delete(rec.address);
  }
  const cells = cellsOf(rec.args);
  s.map.set(rec.address, { rec, cells });
  s.cells += cells;
  while (s.map.size > 1 && (s.map.size > MAX_RECORDS || s.cells > MAX_CELLS)) {
    const [oldest, entry] = s.map.entries().next().value!;
    s.cells -= entry.cells;
    s.map.delete(oldest);
  }
}

/** Normalise an address for lookup: drop quotes and $ signs, upper-case. */
export function normaliseAddress(a: string): string {
  return a.replace(/\$/g, "").replace(/'/g, "").toUpperCase();
}

/** The record whose calling cell is `address` (sheet-qualified), if any. */
export function lookup(address: string): FormulaRecord | undefined {
  const want = normaliseAddress(address);
  for (const { rec } of store().map.values()) if (normaliseAddress(rec.address) === want) return rec;
  return undefined;
}
