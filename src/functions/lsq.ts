/**
 * The LSQ functions as plain TypeScript: named spreadsheet values in, a 2-D result out, or a
 * thrown SheetError for a single error value. functions.ts wraps these for the host through
 * `invoke`, which turns every failure into one error value and records the call for the pane.
 * Result layouts are fixed (shared workbooks depend on them); see README "Function reference".
 */
import type { NotAvailable, Quantity } from "../core/errors";
import { RowStatus } from "../core/design";
import { findingText, findings, partsText, relationParts } from "../findings/findings";
import { cellError, SheetError, type CellErrorLike } from "./cellerror";
import { getModel, omitted, requireEnoughRows, settleCache, toSheetError, type FitArgs, type Model } from "./model";
import { recordCall } from "./registry";
import { blankPlan, possibleBlanks, resolveBlanks, type BlankPlan } from "./blanks";
import { readBlock, readBoolean, readNumber, readWord, shapeOf } from "./values";

export type Cell = number | string | CellErrorLike;
export type Grid = Cell[][];

/** Where a call records what it computed (for the pane), once its arguments passed validation. */
export interface CallContext {
  result: object | null;
  /** Rows whose zeros may be empty cells the host could not confirm (blanks.ts), for CHECK and the pane. */
  possibleBlanks?: { rows: number[]; columns: string[] };
}

/** A finite number, or #N/A with the reason (never NaN or Infinity in a cell). */
export function q(v: Quantity): Cell {
  if (typeof v === "number") return Number.isFinite(v) ? v : cellError("#N/A", "the value is too large to represent");
  return cellError("#N/A", v.na);
}

export function readLevel(v: unknown, dflt = 0.95): number {
  const level = readNumber(v, "level", dflt);
  if (!(level > 0 && level < 1)) throw new SheetError("#VALUE!", `level must be between 0 and 1, e.g. 0.95 (it is ${level})`);
  return level;
}

/** Read the optional `headers` argument (default FALSE). */
export function readHeaders(v: unknown): boolean {
  return readBoolean(v, "headers", false);
}

/** The #N/A message for a coefficient that cannot be estimated: its relation to the kept columns. */
export function coefMessage(model: Model, j: number): string {
  const dep = model.fit.dependencies().find((d) => d.column === j);
  if (!dep) return "not identifiable";
  return `not identifiable: ${partsText(relationParts(dep, model.labels, model.fit.spec.intercept ? 0 : -1))}`;
}

/** Replace the core's generic non-identifiable reason by the relation, in the user's labels. */
function relationNA(model: Model, j: number): NotAvailable {
  return { na: coefMessage(model, j) };
}

/**
 * Calls whose arguments hold at least this many cells run in phases with a yield to the page
 * between them (README "Memory and time"): the fit (cached), then the function's own work. The
 * pane and the host's messages are handled in between; the longest stretch without a yield is one
 * fit, at most a few seconds at the size limits.
 */
export const ASYNC_CELLS = 50_000;

/** Cells of the array arguments, from their lengths only (never walks a hostile array). */
function argumentCells(args: Record<string, unknown>): number {
  let n = 0;
  for (const v of Object.values(args)) {
    if (!Array.isArray(v)) continue;
    const first: unknown = v.length > 0 ? v[0] : null;
    n += v.length * (Array.isArray(first) ? first.length : 1);
  }
  return n;
}

/** Let the page run (a macrotask where the runtime has timers, else a microtask). */
function yieldToPage(): Promise<void> {
  const st = (globalThis as { setTimeout?: (f: () => void, ms: number) => unknown }).setTimeout;
  return new Promise((resolve) => (typeof st === "function" ? st(resolve, 0) : Promise.resolve().then(resolve)));
}

/**
 * Run one function call for the host: every failure — a bad argument, a fit that cannot be done,
 * or anything unexpected (a throwing getter, a Proxy, a value whose description throws) — becomes
 * one error value with a message. After the call, a call whose arguments passed validation is
 * recorded for the pane, and the fit cache is measured again; neither can make the call fail.
 * Large calls (ASYNC_CELLS) return a promise and yield to the page between phases.
 */
export function invoke(fn: string, invocation: unknown, args: Record<string, unknown>, body: (a: Record<string, unknown>, ctx: CallContext) => Grid): Grid | Promise<Grid> {
  let big = false;
  let plan: BlankPlan = { checks: [] };
  try {
    big = argumentCells(args) >= ASYNC_CELLS;
    plan = blankPlan(fn, args, invocation);
  } catch {
    // the call itself will report what is wrong with its arguments
  }
  if (!big && plan.checks.length === 0) return runNow(fn, invocation, args, body);
  return (async () => {
    let a = args;
    let blanks: CallContext["possibleBlanks"];
    if (plan.checks.length > 0) {
      let r: Awaited<ReturnType<typeof resolveBlanks>> = null;
      try {
        r = await resolveBlanks(plan, args);
      } catch {
        r = null;
      }
      if (r) a = r.args;
      else blanks = possibleBlanks(plan);
    }
    if (big) {
      await yieldToPage();
      if ("weights" in a) {
        try {
          getModel(a as unknown as FitArgs); // phase 1: the fit, left in the cache
        } catch {
          // reported by phase 2, which meets the same error
        }
        await yieldToPage();
      }
    }
    return runNow(fn, invocation, a, body, blanks);
  })();
}

function runNow(fn: string, invocation: unknown, args: Record<string, unknown>, body: (a: Record<string, unknown>, ctx: CallContext) => Grid, blanks?: CallContext["possibleBlanks"]): Grid {
  const ctx: CallContext = { result: null, possibleBlanks: blanks };
  let out: Grid | null = null;
  let err: SheetError | null = null;
  try {
    out = body(args, ctx);
  } catch (e) {
    err = toSheetError(e);
  }
  try {
    if (ctx.result && invocation && typeof invocation === "object") {
      const inv = invocation as { address?: unknown; parameterAddresses?: unknown };
      const addrs = Array.isArray(inv.parameterAddresses) ? (inv.parameterAddresses as unknown[]) : [];
      if (typeof inv.address === "string") recordCall(fn, inv.address, addrs, args, ctx.result, ctx.possibleBlanks);
    }
    settleCache();
  } catch {
    // recording is for the pane only: the result stands
  }
  if (err || !out) {
    const e = err ?? new SheetError("#N/A", "no result");
    throw cellError(e.code, e.message);
  }
  return out;
}

/** The fit for a call's arguments, noted in the call context for the pane. */
export function modelFor(a: FitArgs, ctx?: CallContext): Model {
  const model = getModel(a);
  if (ctx) ctx.result = model;
  return model;
}

/** Add term names as a first column and a header row (the `headers` option of per-parameter results). */
function labelled(model: Model, head: string[], rows: Cell[][], withTerms: boolean): Grid {
  const body = withTerms ? rows.map((r, j) => [model.labels[j] ?? `term ${j + 1}`, ...r]) : rows;
  return [withTerms ? ["term", ...head] : head, ...body];
}

export function coef(a: FitArgs & { headers?: unknown }, ctx?: CallContext): Grid {
  const headers = readHeaders(a.headers);
  const model = modelFor(a, ctx);
  requireEnoughRows(model);
  const b = model.fit.coefficients();
  const rows = Array.from(b, (v, j): Cell[] => [Number.isNaN(v) ? cellError("#N/A", coefMessage(model, j)) : q(v)]);
  return headers ? labelled(model, ["estimate"], rows, true) : rows;
}

/** One cell per input row (a column, or a row when y was a row); #N/A with the reason for skipped rows. */
function rowAligned(model: Model, values: Float64Array): Grid {
  const { status } = model.fit;
  const m = model.m;
  const cell = (i: number): Cell => {
    const st = status[i]!;
    if (st !== RowStatus.Used && st !== RowStatus.ZeroWeight) return cellError("#N/A", `row ${i + 1} was skipped: ${model.skipReason(i)}`);
    const v = values[i]!;
    return Number.isFinite(v) ? v : q(v);
  };
  if (model.asRow) {
    const row: Cell[] = new Array<Cell>(m);
    for (let i = 0; i < m; i++) row[i] = cell(i);
    return [row];
  }
  const out: Grid = new Array<Cell[]>(m);
  for (let i = 0; i < m; i++) out[i] = [cell(i)];
  return out;
}

export function fitted(a: FitArgs, ctx?: CallContext): Grid {
  const model = modelFor(a, ctx);
  requireEnoughRows(model);
  return rowAligned(model, model.fit.fittedAndResiduals().fitted);
}

export function resid(a: FitArgs, ctx?: CallContext): Grid {
  const model = modelFor(a, ctx);
  requireEnoughRows(model);
  return rowAligned(model, model.fit.fittedAndResiduals().resid);
}

export function cov(a: FitArgs & { headers?: unknown }, ctx?: CallContext): Grid {
  const headers = readHeaders(a.headers);
  const model = modelFor(a, ctx);
  requireEnoughRows(model);
  const rows = model.fit.covariance((j) => relationNA(model, j)).map((row) => row.map(q));
  return headers ? labelled(model, model.labels.slice(), rows, true) : rows;
}

/** Column headings of PARAMS (with `headers`). */
export const PARAMS_HEADINGS = ["estimate", "standard error", "t statistic", "p-value", "lower limit", "upper limit"];

export function params(a: FitArgs & { level?: unknown; headers?: unknown }, ctx?: CallContext): Grid {
  const lv = readLevel(a.level);
  const headers = readHeaders(a.headers);
  const model = modelFor(a, ctx);
  requireEnoughRows(model);
  const rows = model.fit.parameterTable(lv, (j) => relationNA(model, j)).map((r): Cell[] => [q(r.estimate), q(r.standardError), q(r.t), q(r.p), q(r.lower), q(r.upper)]);
  return headers ? labelled(model, PARAMS_HEADINGS.slice(), rows, true) : rows;
}

/** Labels of the STATS rows, in their fixed order. */
export function statsLabels(centered: boolean, weighted: boolean): string[] {
  return [
    "observations used",
    "observations skipped",
    "parameters",
    "rank",
    "residual degrees of freedom",
    weighted ? "weighted residual sum of squares" : "residual sum of squares",
    weighted ? "weighted residual standard error" : "residual standard error",
    centered ? "R² (centered)" : "R² (uncentered, no intercept)",
    "adjusted R²",
    "F statistic",
    "p-value of F",
    "condition number (kept columns, scaled)",
    "log-likelihood",
    "AIC",
    "BIC",
  ];
}

/** The STATS values in the order of statsLabels. */
export function statsValues(model: Model): Quantity[] {
  const s = model.fit.statistics();
  return [s.observationsUsed, s.observationsSkipped, s.parameters, s.rank, s.residualDf, s.rss, s.sigma, s.rSquared, s.adjRSquared, s.fStatistic, s.fPValue, s.conditionNumber, s.logLikelihood, s.aic, s.bic];
}

export function stats(a: FitArgs, ctx?: CallContext): Grid {
  const model = modelFor(a, ctx);
  requireEnoughRows(model);
  const labels = statsLabels(model.fit.statistics().centered, !!model.fit.spec.weights);
  return statsValues(model).map((v, i) => [labels[i]!, q(v)]);
}

/** Read new x rows (same columns as x; a single-x model also takes a row of values). */
export function readNewX(model: Model, newx: unknown, name: string): { data: Float64Array; rows: number; transposed: boolean } {
  const k = model.fit.shape.k;
  const ns = shapeOf(newx, name);
  let transpose = false;
  if (ns.cols !== k) {
    if (ns.rows === k && k === 1) transpose = true;
    else throw new SheetError("#VALUE!", `${name} must have ${k} column${k === 1 ? "" : "s"} like x (it has ${ns.cols})`);
  }
  const nb = readBlock(newx, name, transpose);
  return { data: nb.data, rows: nb.rows, transposed: transpose };
}

export function predict(a: FitArgs & { newx: unknown; interval?: unknown; level?: unknown; headers?: unknown }, ctx?: CallContext): Grid {
  const kind = readWord(a.interval, "interval", ["confidence", "prediction"]) as "confidence" | "prediction" | null;
  const lv = readLevel(a.level);
  const headers = readHeaders(a.headers);
  const model = modelFor(a, ctx);
  requireEnoughRows(model);
  const nx = readNewX(model, a.newx, "newx");
  const preds = model.fit.predict(nx.data, nx.rows, kind, lv, (d) => ({
    na: `this new row does not follow the relation found in the data (${partsText(relationParts(d, model.labels, model.fit.spec.intercept ? 0 : -1))}), so its prediction cannot be estimated`,
  }));
  const rows: Grid = preds.map((pr) => (kind ? [q(pr.value), q(pr.lower!), q(pr.upper!)] : [q(pr.value)]));
  if (nx.transposed && !kind && !headers) return [rows.map((r) => r[0]!)];
  return headers ? [kind ? ["prediction", "lower limit", "upper limit"] : ["prediction"], ...rows] : rows;
}

/** Column headings of INFLUENCE (with `headers`). */
export const INFLUENCE_HEADINGS = ["leverage", "standardized residual", "studentized residual", "Cook's distance"];

export function influence(a: FitArgs & { headers?: unknown }, ctx?: CallContext): Grid {
  const headers = readHeaders(a.headers);
  const model = modelFor(a, ctx);
  requireEnoughRows(model);
  const inf = model.fit.influence();
  const rows = inf.map((r, i): Cell[] => {
    const st = model.fit.status[i]!;
    if (st !== RowStatus.Used && st !== RowStatus.ZeroWeight) {
      const e = cellError("#N/A", `row ${i + 1} was skipped: ${model.skipReason(i)}`);
      return [e, e, e, e];
    }
    return [q(r.leverage), q(r.standardized), q(r.studentized), q(r.cooks)];
  });
  return headers ? [INFLUENCE_HEADINGS.slice(), ...rows] : rows;
}

export function check(a: FitArgs & { newx?: unknown; newy?: unknown }, ctx?: CallContext): Grid {
  let model: Model;
  try {
    model = modelFor(a, ctx);
  } catch (e) {
    // CHECK reports why the other functions fail, as a finding, rather than failing the same way.
    const err = toSheetError(e);
    return [[`Problem: the LSQ functions answer ${err.code} for these arguments: ${err.message}.`]];
  }
  const newx = omitted(a.newx) ? undefined : readNewX(model, a.newx, "newx");
  const newy = omitted(a.newy) ? undefined : readVector(a.newy, "newy");
  return findings({ fit: model.fit, labels: model.labels, skipReason: (i) => model.skipReason(i), weighting: model.weighting, newx, newy, possibleBlanks: ctx?.possibleBlanks }).map((f) => [findingText(f)]);
}

/** A single row or column of numbers (NaN for cells that are not numbers). */
export function readVector(v: unknown, name: string): Float64Array {
  const s = shapeOf(v, name);
  if (s.rows !== 1 && s.cols !== 1) throw new SheetError("#VALUE!", `${name} must be a single column or a single row (it is ${s.rows} × ${s.cols})`);
  return readBlock(v, name, s.rows === 1 && s.cols > 1).data;
}

export type { Model };
