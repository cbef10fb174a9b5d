/**
 * The one engine of the runtime, as the task pane sees it. functions.js (the custom functions
 * bundle, loaded first on the pane's page in the shared runtime) publishes this object on
 * globalThis; the pane's own bundle uses it through `import type` only, so the engine, its
 * WebAssembly module and its fit cache exist once per runtime and the pane reuses the fits the
 * functions computed (see DEVELOPERS.md "One engine per runtime").
 */
import { detectionLimits, inverse } from "../core/calibration";
import { lineXY, normalLimits } from "../core/linexy";
import { RowStatus } from "../core/design";
import { Workspace } from "../core/kernels";
import { findings, findingText, formatNumber, formatP, lineXYFindings, listText, partsText, plural, relationParts } from "../findings/findings";
import { GOF_LABELS, INVERSE_HEADINGS, inverseOf, lineXYOf, LIMITS_LABELS, limitsOf } from "./calibrate";
import { PARAMS_HEADINGS, readNewX } from "./lsq";
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

let reassociate: () => void = () => undefined;

export const engine = {
  getModel,
  inverseOf,
  limitsOf,
  lineXYOf,
  readNewX,
  lineXYFindings,
  listText,
  plural,
  LIMITS_LABELS,
  INVERSE_HEADINGS,
  GOF_LABELS,
  PARAMS_HEADINGS,
  /** Associate every function with the host's CustomFunctions again (office.js arrived after functions.js). */
  associateAll(): void {
    reassociate();
  },
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
  normalLimits,
  RowStatus,
  memoryStats,
  cacheStats,
  clearFits: (): void => fitCache().clear(),
};

export type Engine = typeof engine;

export const ENGINE_KEY = "__colspaceEngine";

/** Publish the engine for the pane (called once by functions.ts, with its way to associate again). */
export function publishEngine(associateWithHost: () => void): void {
  reassociate = associateWithHost;
  (globalThis as unknown as Record<string, Engine>)[ENGINE_KEY] = engine;
}
