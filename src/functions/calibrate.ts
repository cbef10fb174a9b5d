/**
 * The calibration functions: INVERSE (reading unknown samples back from the curve), LIMITS
 * (decision, detection and quantitation limits) and GOF (tests of the model itself). They take the
 * same fit block as the other functions and share the fit cache (README "Calibration").
 */
import { detectionLimits, inverse, type InverseRow, type LimitsOptions } from "../core/calibration";
import { lineXY, normalLimits, type LineXY } from "../core/linexy";
import type { Quantity } from "../core/errors";
import { cellError, SheetError } from "./cellerror";
import { omitted, requireEnoughRows, type FitArgs, type Model } from "./model";
import { modelFor, q, readHeaders, readLevel, readVector, type CallContext, type Cell, type Grid } from "./lsq";
import { MAX_RANGE_CELLS, readNumber, readWord } from "./values";

/** Column headings of INVERSE (with `headers`). */
export const INVERSE_HEADINGS = ["x", "standard uncertainty", "lower limit", "upper limit"];

/** A positive whole number argument (replicates, samples). */
function readCount(v: unknown, name: string, dflt: number): number {
  const c = readNumber(v, name, dflt);
  if (!Number.isInteger(c) || c < 1 || c > 1e6) throw new SheetError("#VALUE!", `${name} must be a whole number of at least 1 (it is ${c})`);
  return c;
}

/** INVERSE's arguments read and checked, with its fit and its rows (also used by the pane). */
export function inverseOf(a: FitArgs & { newy: unknown; level?: unknown; replicates?: unknown; ureading?: unknown }, ctx?: CallContext): { model: Model; newy: Float64Array; level: number; replicates: number; rows: InverseRow[] } {
  const level = readLevel(a.level);
  const replicates = readCount(a.replicates, "replicates", 1);
  let ureading: number | null = null;
  if (!omitted(a.ureading)) {
    ureading = readNumber(a.ureading, "ureading", NaN);
    if (!(ureading > 0)) throw new SheetError("#VALUE!", `ureading, the standard uncertainty of one reading, must be positive (it is ${ureading})`);
  }
  const newy = readVector(a.newy, "newy");
  const model = modelFor(a, ctx);
  requireEnoughRows(model);
  if (model.fit.shape.k !== 1) throw new SheetError("#VALUE!", `INVERSE reads a reading back to one x, so x must be a single column (it has ${model.fit.shape.k})`);
  return { model, newy, level, replicates, rows: inverse(model.fit, newy, { level, replicates, readingUncertainty: ureading }) };
}

export function inverseFn(a: FitArgs & { newy: unknown; level?: unknown; replicates?: unknown; ureading?: unknown; headers?: unknown }, ctx?: CallContext): Grid {
  const headers = readHeaders(a.headers);
  const rows = inverseOf(a, ctx).rows.map((r): Cell[] => [q(r.x), q(r.u), q(r.lower), q(r.upper)]);
  return headers ? [INVERSE_HEADINGS.slice(), ...rows] : rows;
}

/** Labels of the LIMITS rows, in their fixed order. */
export const LIMITS_LABELS = [
  "decision limit (critical value, x units)",
  "limit of detection (x units)",
  "limit of quantitation (x units)",
  "critical response (y units)",
  "method",
  "α (false positive rate)",
  "β (false negative rate)",
  "k (quantitation factor)",
  "measurements per sample",
];

/** LIMITS's arguments read and checked, with its fit and the values in LIMITS_LABELS order (also used by the pane). */
export function limitsOf(a: FitArgs & { method?: unknown; alpha?: unknown; beta?: unknown; k?: unknown; samples?: unknown }, ctx?: CallContext): { model: Model; values: (Quantity | string)[] } {
  const method = (readWord(a.method, "method", ["calibration", "ich"]) ?? "calibration") as LimitsOptions["method"];
  const alpha = readNumber(a.alpha, "alpha", 0.01);
  if (!(alpha > 0 && alpha < 0.5)) throw new SheetError("#VALUE!", `alpha must be between 0 and 0.5, e.g. 0.01 (it is ${alpha})`);
  const beta = readNumber(a.beta, "beta", alpha);
  if (!(beta > 0 && beta < 0.5)) throw new SheetError("#VALUE!", `beta must be between 0 and 0.5, e.g. 0.01 (it is ${beta})`);
  const k = readNumber(a.k, "k", 3);
  if (!(k > 0 && Number.isFinite(k))) throw new SheetError("#VALUE!", `k, the quantitation factor, must be positive, e.g. 3 (it is ${k})`);
  const samples = readCount(a.samples, "samples", 1);
  const model = modelFor(a, ctx);
  requireEnoughRows(model);
  const lim = detectionLimits(model.fit, { method, alpha, beta, k, samples });
  const ich = method === "ich";
  const notUsed: Quantity = { na: "not used by the ICH Q2 convention" };
  return {
    model,
    values: [
      lim.decision,
      lim.detection,
      lim.quantitation,
      lim.criticalResponse,
      ich ? "ICH Q2: 3.3·s/slope and 10·s/slope" : "calibration line (DIN 32645, ISO 11843-2)",
      ich ? notUsed : alpha,
      ich ? notUsed : beta,
      ich ? 10 : k,
      ich ? notUsed : samples,
    ],
  };
}

export function limitsFn(a: FitArgs & { method?: unknown; alpha?: unknown; beta?: unknown; k?: unknown; samples?: unknown }, ctx?: CallContext): Grid {
  const { values } = limitsOf(a, ctx);
  return LIMITS_LABELS.map((l, i) => {
    const v = values[i]!;
    return [l, typeof v === "string" ? v : q(v)];
  });
}

/** Labels of the GOF rows, in their fixed order. */
export const GOF_LABELS = [
  "lack-of-fit sum of squares",
  "lack-of-fit degrees of freedom",
  "pure-error sum of squares",
  "pure-error degrees of freedom",
  "lack-of-fit F",
  "p-value of lack-of-fit F",
  "χ² (known uncertainties)",
  "χ² degrees of freedom",
  "p-value of χ²",
  "reduced χ²",
  "term added to test curvature",
  "t of the added term",
  "p-value of the added term",
];

export function gofFn(a: FitArgs, ctx?: CallContext): Grid {
  const model = modelFor(a, ctx);
  requireEnoughRows(model);
  const fit = model.fit;
  const lof = fit.lackOfFit();
  const chi = fit.chiSquare();
  const at = fit.addedTerm();
  const values: (Quantity | string)[] = [lof.sumSquares, lof.df, lof.pureErrorSumSquares, lof.pureErrorDf, lof.F, lof.p, chi.chi2, chi.df, chi.p, chi.reduced, at.term, at.t, at.p];
  return GOF_LABELS.map((l, i) => {
    const v = values[i]!;
    return [l, typeof v === "string" ? v : q(v)];
  });
}

/** Labels of the LINEXY rows (first column), in their fixed order; row 1 is the header row. */
export const LINEXY_LABELS = ["", "intercept", "slope", "covariance of intercept and slope", "χ² (weighted sum of squared distances)", "degrees of freedom (n − 2)", "p-value of χ²", "iterations", "rows used", "rows skipped"];
export const LINEXY_HEADINGS = ["estimate", "standard uncertainty", "lower limit", "upper limit"];

/**
 * A per-row argument that may also be one value for every row: a single cell is repeated, a
 * range must have one value per row of y.
 */
function perRow(v: unknown, name: string, m: number, dflt: number | null): Float64Array {
  if (omitted(v)) {
    if (dflt === null) throw new SheetError("#VALUE!", `${name} is required: a standard uncertainty for every row, or one value for all rows`);
    return new Float64Array(m).fill(dflt);
  }
  if (!Array.isArray(v)) {
    const one = readNumber(v, name, NaN);
    return new Float64Array(m).fill(one);
  }
  const data = readVector(v, name);
  if (data.length === 1) return new Float64Array(m).fill(data[0]!);
  if (data.length !== m) throw new SheetError("#VALUE!", `${name} has ${data.length} values but y has ${m}; give one per row, or a single value for all rows`);
  return data;
}

/** LINEXY's arguments read and checked, with its result (also used by the pane). */
export interface LineXYCall {
  readonly lineXY: LineXY;
  readonly x: Float64Array;
  readonly y: Float64Array;
  readonly ux: Float64Array;
  readonly uy: Float64Array;
  readonly level: number;
}

export function lineXYOf(a: { y: unknown; x: unknown; uy: unknown; ux: unknown; correlation?: unknown; level?: unknown }, ctx?: CallContext): LineXYCall {
  const level = readLevel(a.level);
  const y = readVector(a.y, "y");
  const x = readVector(a.x, "x");
  if (x.length !== y.length) throw new SheetError("#VALUE!", `y has ${y.length} values but x has ${x.length}; they must match row for row`);
  const m = y.length;
  if (m > MAX_RANGE_CELLS / 4) throw new SheetError("#VALUE!", `LINEXY accepts at most ${MAX_RANGE_CELLS / 4} rows`);
  const uy = perRow(a.uy, "uy", m, null);
  const ux = perRow(a.ux, "ux", m, null);
  const r = perRow(a.correlation, "correlation", m, 0);
  const out: LineXYCall = { lineXY: lineXY({ x, y, ux, uy, r }), x, y, ux, uy, level };
  if (ctx) ctx.result = out;
  return out;
}

export function linexyFn(a: { y: unknown; x: unknown; uy: unknown; ux: unknown; correlation?: unknown; level?: unknown }, ctx?: CallContext): Grid {
  const { lineXY: fit, level } = lineXYOf(a, ctx);
  const la = normalLimits(fit.intercept, fit.uIntercept, level);
  const lb = normalLimits(fit.slope, fit.uSlope, level);
  const blank = "";
  return [
    [LINEXY_LABELS[0]!, ...LINEXY_HEADINGS],
    [LINEXY_LABELS[1]!, q(fit.intercept), q(fit.uIntercept), q(la.lower), q(la.upper)],
    [LINEXY_LABELS[2]!, q(fit.slope), q(fit.uSlope), q(lb.lower), q(lb.upper)],
    [LINEXY_LABELS[3]!, q(fit.covariance), blank, blank, blank],
    [LINEXY_LABELS[4]!, q(fit.chi2), blank, blank, blank],
    [LINEXY_LABELS[5]!, fit.df, blank, blank, blank],
    [LINEXY_LABELS[6]!, q(fit.p), blank, blank, blank],
    [LINEXY_LABELS[7]!, fit.iterations, blank, blank, blank],
    [LINEXY_LABELS[8]!, fit.used, blank, blank, blank],
    [LINEXY_LABELS[9]!, fit.skipped, blank, blank, blank],
  ];
}
