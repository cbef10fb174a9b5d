/**
 * One memory budget for the add-in (README "Memory and time"): what the long-lived runtime keeps
 * between calls, split between its stores. Each store accounts the bytes it really keeps, measured
 * from its arrays: the fit cache (model.ts, cache.ts), the formula registry (registry.ts) and the
 * engine's shared scratch workspace (core/kernels.ts, capped at SCRATCH_BYTES).
 */
import { SCRATCH_BYTES } from "../core/kernels";

/** Default total of retained memory: 256 MiB. */
export const DEFAULT_BUDGET = 256 * 1024 * 1024;

export interface Budget {
  /** Everything retained together. */
  readonly total: number;
  /** The engine's shared scratch workspace, at most (kernels.ts). */
  readonly scratch: number;
  /** The formula registry (addresses and small arguments for the pane). */
  readonly registry: number;
  /** Compiled kernels, code and fixed overhead (an allowance). */
  readonly fixed: number;
  /** The fit cache: the rest. */
  readonly fits: number;
}

export function memoryBudget(total = DEFAULT_BUDGET): Budget {
  const scratch = SCRATCH_BYTES;
  const registry = 4 * 1024 * 1024;
  const fixed = 8 * 1024 * 1024;
  return { total, scratch, registry, fixed, fits: Math.max(16 * 1024 * 1024, total - scratch - registry - fixed) };
}
