/**
 * The parameter names of every LSQ function, in order (the frozen interface; README "Function
 * reference"). The pane uses them to find an argument's address; the metadata test keeps its own
 * copy of this table and compares it with the generated functions.json.
 */
const FIT = ["y", "x", "weights", "intercept", "degree"] as const;

export const SIGNATURES: Readonly<Record<string, readonly string[]>> = {
  COEF: [...FIT, "headers", "weighting"],
  FITTED: [...FIT, "weighting"],
  RESID: [...FIT, "weighting"],
  COV: [...FIT, "headers", "weighting"],
  PARAMS: [...FIT, "level", "headers", "weighting"],
  STATS: [...FIT, "weighting"],
  PREDICT: ["newx", ...FIT, "interval", "level", "headers", "weighting"],
  INFLUENCE: [...FIT, "headers", "weighting"],
  CHECK: [...FIT, "weighting", "newx", "newy"],
  INVERSE: ["newy", ...FIT, "level", "replicates", "ureading", "headers", "weighting"],
  LIMITS: [...FIT, "method", "alpha", "beta", "k", "samples", "weighting"],
  GOF: [...FIT, "weighting"],
  LINEXY: ["y", "x", "uy", "ux", "correlation", "level"],
};

/** Position of a named argument of function `fn`, or −1. */
export function argumentIndex(fn: string, name: string): number {
  return SIGNATURES[fn]?.indexOf(name) ?? -1;
}
