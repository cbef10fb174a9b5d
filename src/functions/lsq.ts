/**
 * The nine LSQ functions as plain TypeScript: spreadsheet values in, a 2-D result out, or a
 * thrown SheetError for a single error value. functions.ts wraps these for the host.
 * Result layouts are fixed (shared workbooks depend on them); see README "Function reference".
 */
import type { Quantity } from "../core/errors";
import { RowStatus } from "../core/design";
import { findingText, findings, partsText, relationParts } from "../findings/findings";
import { cellError, SheetError, type CellErrorLike } from "./cellerror";
import { getModel, requireEnoughRows, toSheetError, type Model } from "./model";
import { readBlock, readNumber, readWord, shapeOf } from "./values";

export type Cell = number | string | CellErrorLike;
export type Grid = Cell[][];

/** A finite number, or #N/A with the reason (never NaN or Infinity in a cell). */
function q(v: Quantity): Cell {
  if (typeof v === "number") return Number.isFinite(v) ? v : cellError("#NUM!", "the value is too large to represent");
  return cellError("#N/A", v.na);
}

function readLevel(v: unknown): number {
  const level = readNumber(v, "level", 0.95);
  if (!(level > 0 && level < 1)) throw new SheetError("#NUM!", `level must be between 0 and 1, e.g. 0.95 (it is ${level})`);
  return level;
}

function coefMessage(model: Model, j: number): string {
  const dep = model.fit.dependencies().find((d) => d.column === j);
  if (!dep) return "not identifiable";
  return `not identifiable: ${partsText(relationParts(dep, model.labels, model.fit.spec.intercept ? 0 : -1))}`;
}

/** Run a function body, turning any failure into one spreadsheet error. */
export function guard(body: () => Grid): Grid {
  try {
    return body();
  } catch (e) {
    const err = toSheetError(e);
    throw cellError(err.code, err.message);
  }
}

export function coef(y: unknown, x: unknown, intercept: unknown, weights: unknown, degree: unknown): Grid {
  const model = getModel(y, x, intercept, weights, degree);
  requireEnoughRows(model);
  const b = model.fit.coefficients();
  return Array.from(b, (v, j) => [Number.isNaN(v) ? cellError("#N/A", coefMessage(model, j)) : q(v)]);
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

export function fitted(y: unknown, x: unknown, intercept: unknown, weights: unknown, degree: unknown): Grid {
  const model = getModel(y, x, intercept, weights, degree);
  requireEnoughRows(model);
  return rowAligned(model, model.fit.fittedAndResiduals().fitted);
}

export function resid(y: unknown, x: unknown, intercept: unknown, weights: unknown, degree: unknown): Grid {
  const model = getModel(y, x, intercept, weights, degree);
  requireEnoughRows(model);
  return rowAligned(model, model.fit.fittedAndResiduals().resid);
}

export function cov(y: unknown, x: unknown, intercept: unknown, weights: unknown, degree: unknown): Grid {
  const model = getModel(y, x, intercept, weights, degree);
  requireEnoughRows(model);
  return model.fit.covariance().map((row) => row.map(q));
}

export function params(y: unknown, x: unknown, intercept: unknown, weights: unknown, degree: unknown, level: unknown): Grid {
  const lv = readLevel(level);
  const model = getModel(y, x, intercept, weights, degree);
  requireEnoughRows(model);
  return model.fit.parameterTable(lv).map((r, j) => {
    if (typeof r.estimate !== "number") {
      const e = cellError("#N/A", coefMessage(model, j));
      return [e, e, e, e, e, e];
    }
    return [q(r.estimate), q(r.standardError), q(r.t), q(r.p), q(r.lower), q(r.upper)];
  });
}

/** Labels of the STATS rows, in their fixed order. */
export function statsLabels(centred: boolean): string[] {
  return [
    "observations used",
    "observations skipped",
    "parameters",
    "rank",
    "residual degrees of freedom",
    "residual sum of squares",
    "residual standard error",
    centred ? "R² (centred)" : "R² (uncentred, no intercept)",
    "adjusted R²",
    "F statistic",
    "p-value of F",
    "condition number (scaled columns)",
    "log-likelihood",
    "AIC",
    "BIC",
  ];
}

export function stats(y: unknown, x: unknown, intercept: unknown, weights: unknown, degree: unknown): Grid {
  const model = getModel(y, x, intercept, weights, degree);
  requireEnoughRows(model);
  const s = model.fit.statistics();
  const values: Quantity[] = [s.observationsUsed, s.observationsSkipped, s.parameters, s.rank, s.residualDf, s.rss, s.sigma, s.rSquared, s.adjRSquared, s.fStatistic, s.fPValue, s.conditionNumber, s.logLikelihood, s.aic, s.bic];
  const labels = statsLabels(s.centred);
  return values.map((v, i) => [labels[i]!, q(v)]);
}

export function predict(y: unknown, x: unknown, newx: unknown, intercept: unknown, weights: unknown, degree: unknown, interval: unknown, level: unknown): Grid {
  const kind = readWord(interval, "interval", ["confidence", "prediction"]);
  const lv = readLevel(level);
  const model = getModel(y, x, intercept, weights, degree);
  requireEnoughRows(model);
  const { fit } = model;
  const k = fit.shape.k;
  const ns = shapeOf(newx, "newx");
  let transpose = false;
  if (ns.cols !== k) {
    if (ns.rows === k && k === 1) transpose = true;
    else throw new SheetError("#VALUE!", `newx must have ${k} column${k === 1 ? "" : "s"} like x (it has ${ns.cols})`);
  }
  const nb = readBlock(newx, "newx", transpose);
  const preds = fit.predict(nb.data, nb.rows);
  const tq = kind ? fit.tCritical(lv) : 0;
  const rows: Grid = preds.map((pr) => {
    if (!kind) return [q(pr.value)];
    if (typeof pr.value !== "number") return [q(pr.value), q(pr.value), q(pr.value)];
    const se = kind === "confidence" ? pr.seMean : pr.seNew;
    if (typeof tq !== "number") return [q(pr.value), q(tq), q(tq)];
    if (typeof se !== "number") return [q(pr.value), q(se), q(se)];
    return [q(pr.value), q(pr.value - tq * se), q(pr.value + tq * se)];
  });
  if (transpose && !kind) return [rows.map((r) => r[0]!)];
  return rows;
}

export function influence(y: unknown, x: unknown, intercept: unknown, weights: unknown, degree: unknown): Grid {
  const model = getModel(y, x, intercept, weights, degree);
  requireEnoughRows(model);
  const inf = model.fit.influence();
  return inf.map((r, i) => {
    const st = model.fit.status[i]!;
    if (st !== RowStatus.Used && st !== RowStatus.ZeroWeight) {
      const e = cellError("#N/A", `row ${i + 1} was skipped: ${model.skipReason(i)}`);
      return [e, e, e, e];
    }
    return [q(r.leverage), q(r.standardized), q(r.studentized), q(r.cooks)];
  });
}

export function check(y: unknown, x: unknown, intercept: unknown, weights: unknown, degree: unknown): Grid {
  const model = getModel(y, x, intercept, weights, degree);
  return findings({ fit: model.fit, labels: model.labels, skipReason: (i) => model.skipReason(i) }).map((f) => [findingText(f)]);
}

export type { Model };
