/**
 * The one engine of the runtime, as the task pane sees it. functions.js (the custom functions
 * bundle, loaded first on the pane's page in the shared runtime) publishes this object on
 * globalThis; the pane's own bundle uses it through `import type` only, so the engine, its
 * WebAssembly module and its fit cache exist once per runtime and the pane reuses the fits the
 * functions computed (see DEVELOPERS.md "One engine per runtime").
 */
import { detectionLimits, inverse } from "../core/calibration";
import { lineXY } from "../core/linexy";
import { RowStatus } from "../core/design";
import { Workspace } from "../core/kernels";
import { findings, findingText, formatNumber, formatP, partsText, relationParts } from "../findings/findings";
import { cacheStats, defaultLabels, fitCache, getModel, toSheetError } from "./model";
import { lookup, registryStats } from "./registry";
import { argumentIndex } from "./signatures";
import { statsLabels, statsValues } from "./lsq";
import { memoryBudget } from "./budget";

/** What the add-in keeps between calls, by store, as each store accounts it (bytes). */
export function memoryStats(): { fits: number; fitEntries: number; registry: number; registryRecords: number; scratch: number; total: number; budget: number } {
  const c = cacheStats();
  const r = registryStats();
  const scratch = Workspace.scratchBytes();
  return { fits: c.bytes, fitEntries: c.size, registry: r.bytes, registryRecords: r.records, scratch, total: c.bytes + r.bytes + scratch, budget: memoryBudget().total };
}

export const engine = {
  getModel,
  defaultLabels,
  toSheetError,
  lookup,
  argumentIndex,
  findings,
  findingText,
  formatNumber,
  formatP,
  partsText,
  relationParts,
  statsLabels,
  statsValues,
  inverse,
  detectionLimits,
  lineXY,
  RowStatus,
  memoryStats,
  cacheStats,
  clearFits: (): void => fitCache().clear(),
};

export type Engine = typeof engine;

export const ENGINE_KEY = "__colspaceEngine";

/** Publish the engine for the pane (called once by functions.ts). */
export function publishEngine(): void {
  (globalThis as unknown as Record<string, Engine>)[ENGINE_KEY] = engine;
}
