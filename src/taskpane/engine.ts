/**
 * The engine, as published by functions.js on the same page (functions/api.ts). The pane's
 * bundle imports engine modules for their types only, so one engine, one WebAssembly module and
 * one fit cache serve both the functions and the pane.
 */
import type { Engine } from "../functions/api";

export function engine(): Engine {
  const e = (globalThis as unknown as { __colspaceEngine?: Engine }).__colspaceEngine;
  if (!e) throw new Error("the Colspace functions script did not load, so the pane cannot compute (reload the pane)");
  return e;
}
