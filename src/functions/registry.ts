/**
 * What each LSQ formula last computed, by calling-cell address, for the task pane. In the
 * shared runtime the functions and the pane run in one JavaScript context but in separate
 * bundles, so the registry lives on globalThis. Bounded: the oldest addresses are dropped.
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
const KEY = "__colspaceFormulaRegistry";

type Store = Map<string, FormulaRecord>;

export function registry(): Store {
  const g = globalThis as unknown as Record<string, Store | undefined>;
  let s = g[KEY];
  if (!s) {
    s = new Map();
    g[KEY] = s;
  }
  return s;
}

export function recordCall(rec: FormulaRecord): void {
  if (!rec.address) return;
  const s = registry();
  s.delete(rec.address);
  s.set(rec.address, rec);
  while (s.size > MAX_RECORDS) s.delete(s.keys().next().value!);
}

/** Normalise an address for lookup: drop quotes and $ signs, upper-case. */
export function normaliseAddress(a: string): string {
  return a.replace(/\$/g, "").replace(/'/g, "").toUpperCase();
}

/** The record whose calling cell is `address` (sheet-qualified), if any. */
export function lookup(address: string): FormulaRecord | undefined {
  const want = normaliseAddress(address);
  for (const r of registry().values()) if (normaliseAddress(r.address) === want) return r;
  return undefined;
}
