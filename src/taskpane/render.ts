/**
 * Rendering a fit into the pane. Every piece of text — including labels that came from the
 * workbook or from pasted data — is set with textContent or createTextNode, never as HTML.
 * Everything shown comes from the engine (taskpane/engine.ts): the same findings, numbers and
 * reasons as the cells.
 */
import type { Model } from "../functions/model";
import type { Finding, Part } from "../findings/findings";
import type { Quantity } from "../core/errors";
import type { InverseRow } from "../core/calibration";
import type { LineXYCall } from "../functions/calibrate";
import { engine } from "./engine";
import { drawBand, drawLine, drawPoints, figure, frame, svgEl, type PlotPoint } from "./plot";

/** Create an element with text content and an optional class. */
export function el<K extends keyof HTMLElementTagNameMap>(tag: K, text?: string, cls?: string): HTMLElementTagNameMap[K] {
  const e = document.createElement(tag);
  if (text !== undefined) e.textContent = text;
  if (cls) e.className = cls;
  return e;
}

const fmt = (v: number, digits = 6): string => engine().formatNumber(v, digits);

/** A quantity as cell text: the number, or "#N/A" (the reason goes in the title). */
function qCell(td: HTMLElement, q: Quantity | string, digits = 6, p = false): HTMLElement {
  if (typeof q === "string") {
    td.textContent = q;
    td.className = "text";
  } else if (typeof q === "number") {
    td.textContent = p ? engine().formatP(q) : fmt(q, digits);
    td.className = "num";
  } else {
    td.textContent = "#N/A";
    td.title = q.na;
    td.className = "na";
  }
  return td;
}

/** The live region where a fit is rendered (announced to screen readers when it changes). */
export function outputRegion(): HTMLElement {
  const out = el("div", undefined, "output");
  out.id = "output";
  out.setAttribute("aria-live", "polite");
  return out;
}

/** Render finding parts as text nodes (labels emphasized). */
function renderParts(parent: HTMLElement, parts: readonly Part[]): void {
  for (const p of parts) {
    if (p.kind === "label") parent.appendChild(el("strong", p.text));
    else parent.appendChild(document.createTextNode(p.text));
  }
}

const SEVERITY_WORD = { problem: "Problem", warning: "Warning", note: "Note", ok: "Fine" } as const;

export function renderFindings(list: readonly Finding[], heading = "What to know about this fit"): HTMLElement {
  const box = el("section", undefined, "findings");
  box.setAttribute("aria-label", "Findings");
  box.appendChild(el("h2", heading));
  const ul = el("ul");
  for (const f of list) {
    const li = el("li", undefined, `finding ${f.severity}`);
    li.dataset.finding = f.id;
    li.appendChild(el("span", SEVERITY_WORD[f.severity], "sev"));
    const what = el("p", undefined, "what");
    renderParts(what, f.what);
    li.appendChild(what);
    if (f.done.length) {
      const p = el("p", undefined, "done");
      renderParts(p, f.done);
      li.appendChild(p);
    }
    if (f.advice.length) {
      const p = el("p", undefined, "advice");
      p.appendChild(el("span", "What you can do: ", "lead"));
      renderParts(p, f.advice);
      li.appendChild(p);
    }
    ul.appendChild(li);
  }
  box.appendChild(ul);
  return box;
}

/**
 * A table that scrolls sideways when narrow, with a visible cue while columns are hidden (the
 * cue disappears when the whole table fits).
 */
export function scrollingTable(table: HTMLTableElement, label: string): HTMLElement {
  const wrap = el("div", undefined, "table-wrap");
  wrap.setAttribute("role", "region");
  wrap.setAttribute("aria-label", label);
  wrap.tabIndex = 0;
  wrap.appendChild(table);
  const cue = el("p", "More columns to the right: scroll the table sideways.", "scroll-cue");
  const box = el("div", undefined, "table-box");
  box.append(wrap, cue);
  const update = (): void => {
    const hidden = wrap.scrollWidth - wrap.clientWidth - wrap.scrollLeft > 2;
    box.classList.toggle("overflowing", hidden);
  };
  wrap.addEventListener("scroll", update);
  if (typeof ResizeObserver === "function") new ResizeObserver(update).observe(wrap);
  requestAnimationFrame(update);
  return box;
}

function headRow(cells: readonly string[]): HTMLTableSectionElement {
  const thead = el("thead");
  const tr = el("tr");
  cells.forEach((h, i) => {
    const th = el("th", h);
    th.setAttribute("scope", "col");
    if (i === 0) th.className = "first";
    tr.appendChild(th);
  });
  thead.appendChild(tr);
  return thead;
}

export function renderCoefficients(model: Model, labels: readonly string[], level = 0.95): HTMLElement {
  const box = el("section", undefined, "coefs");
  box.appendChild(el("h2", "Coefficients"));
  const known = model.weighting === "uncertainty";
  box.appendChild(el("p", `Estimates with standard errors, p-values and ${Math.round(level * 1000) / 10} % confidence limits${known ? " (from the stated uncertainties, normal distribution)" : ""}.`, "table-note"));
  const table = el("table");
  table.appendChild(headRow(["term", "estimate", "standard error", "p-value", "lower limit", "upper limit"]));
  const body = el("tbody");
  const rows = model.fit.parameterTable(level);
  const kept = model.fit.keptIndex();
  rows.forEach((r, j) => {
    const tr = el("tr");
    const th = el("th", labels[j] ?? `term ${j + 1}`);
    th.setAttribute("scope", "row");
    tr.appendChild(th);
    if (kept[j]! < 0) {
      const td = el("td", "#N/A: not identifiable", "na");
      td.colSpan = 5;
      tr.appendChild(td);
    } else {
      tr.appendChild(qCell(el("td"), r.estimate));
      tr.appendChild(qCell(el("td"), r.standardError, 4));
      tr.appendChild(qCell(el("td"), r.p, 2, true));
      tr.appendChild(qCell(el("td"), r.lower));
      tr.appendChild(qCell(el("td"), r.upper));
    }
    body.appendChild(tr);
  });
  table.appendChild(body);
  box.appendChild(scrollingTable(table, "Coefficients"));
  return box;
}

/** The fit summary: the STATS rows, label beside value. */
export function renderStats(model: Model): HTMLElement {
  const E = engine();
  const box = el("section", undefined, "stats");
  box.appendChild(el("h2", "Fit summary"));
  const s = model.fit.statistics();
  const labels = E.statsLabels(s.centered, !!model.fit.spec.weights);
  const values = E.statsValues(model);
  const dl = el("dl", undefined, "summary");
  values.forEach((v, i) => {
    const row = el("div", undefined, "pair");
    row.appendChild(el("dt", labels[i]!));
    const dd = qCell(el("dd"), v, 6, labels[i] === "p-value of F");
    row.appendChild(dd);
    dl.appendChild(row);
  });
  box.appendChild(dl);
  return box;
}

export interface PlotOptions {
  rowNumber: (i: number) => number;
  /** Called with the input row (0-based) when a point is clicked or Enter is pressed on it. */
  pick?: (i: number) => void;
}

/** Residuals against fitted values, one point per used row (or one sentence for an exact fit). */
export function renderResidualPlot(model: Model, opts: PlotOptions): HTMLElement {
  const E = engine();
  const fig = figure("Residuals against fitted values", "Each point is a used row; the dashed line is zero. Hover over or focus a point to see its row.", "residual-plot");
  if (model.fit.exact) {
    fig.box.appendChild(el("p", "The fit is exact: every residual is zero to within the rounding of the data, so there is nothing to plot.", "plot-empty"));
    return fig.box;
  }
  const { fitted, resid } = model.fit.fittedAndResiduals();
  const pts: PlotPoint[] = [];
  model.fit.status.forEach((st, i) => {
    if (st === E.RowStatus.Used) pts.push({ x: fitted[i]!, y: resid[i]!, row: opts.rowNumber(i), index: i, label: `row ${opts.rowNumber(i)}: fitted ${fmt(fitted[i]!, 5)}, residual ${fmt(resid[i]!, 4)}` });
  });
  if (pts.length === 0) return fig.box;
  let x0 = Infinity;
  let x1 = -Infinity;
  let ym = 0;
  for (const p of pts) {
    x0 = Math.min(x0, p.x);
    x1 = Math.max(x1, p.x);
    ym = Math.max(ym, Math.abs(p.y));
  }
  const f = frame([x0, x1], [-ym, ym], "fitted value", "residual", `Residuals against fitted values, ${pts.length} points`);
  f.svg.appendChild(svgEl("line", { x1: f.left, x2: f.right, y1: f.sy(0).toFixed(1), y2: f.sy(0).toFixed(1) }, "zero"));
  drawPoints(f, pts, fig.status, opts.pick);
  fig.put(f.svg);
  return fig.box;
}

/**
 * The data with the fitted curve and its confidence and prediction bands, for a single x (line or
 * polynomial).
 */
export function renderCurvePlot(model: Model, xName: string, yName: string, opts: PlotOptions, level = 0.95, readings?: { y: number; x: Quantity }[]): HTMLElement | null {
  const E = engine();
  const fit = model.fit;
  if (fit.shape.k !== 1 || fit.rank < fit.parameters || fit.n === 0) return null;
  const xs: number[] = [];
  const pts: PlotPoint[] = [];
  let y0 = Infinity;
  let y1 = -Infinity;
  fit.status.forEach((st, i) => {
    if (st !== E.RowStatus.Used && st !== E.RowStatus.ZeroWeight) return;
    const x = fit.spec.x[i]!;
    const y = fit.spec.y[i]!;
    xs.push(x);
    y0 = Math.min(y0, y);
    y1 = Math.max(y1, y);
    pts.push({ x, y, row: opts.rowNumber(i), index: i, label: `row ${opts.rowNumber(i)}: ${xName} ${fmt(x, 5)}, ${yName} ${fmt(y, 5)}` });
  });
  const lo = Math.min(...xs);
  const hi = Math.max(...xs);
  const grid = Array.from({ length: 121 }, (_, t) => lo + ((hi - lo) * t) / 120);
  const conf = fit.predict(Float64Array.from(grid), grid.length, "confidence", level);
  const pred = fit.spec.varianceKnown ? null : fit.predict(Float64Array.from(grid), grid.length, "prediction", level);
  const num = (q: Quantity | undefined): number => (typeof q === "number" ? q : NaN);
  const curve = conf.map((p) => num(p.value));
  const bands = [conf.map((p) => num(p.lower)), conf.map((p) => num(p.upper)), ...(pred ? [pred.map((p) => num(p.lower)), pred.map((p) => num(p.upper))] : [])];
  for (const b of bands) for (const v of b) if (Number.isFinite(v)) (y0 = Math.min(y0, v)), (y1 = Math.max(y1, v));
  const pct = `${Math.round(level * 1000) / 10} %`;
  const fig = figure(
    "Data and fitted curve",
    pred
      ? `The line is the fitted curve; the darker band is the ${pct} confidence band for the mean response, the lighter one the ${pct} prediction band for a new reading.`
      : `The line is the fitted curve; the band is the ${pct} confidence band for the mean response (with stated uncertainties a new reading's band needs its own uncertainty).`,
    "curve-plot",
  );
  const f = frame([lo, hi], [y0, y1], xName, yName, `${yName} against ${xName} with the fitted curve, ${pts.length} points`);
  if (pred) drawBand(f, grid, bands[2]!, bands[3]!, "band prediction");
  drawBand(f, grid, bands[0]!, bands[1]!, "band confidence");
  drawLine(f, grid, curve, "curve");
  for (const r of readings ?? []) {
    if (typeof r.x !== "number") continue;
    const y = f.sy(r.y).toFixed(1);
    f.svg.appendChild(svgEl("line", { x1: f.left, x2: f.sx(r.x).toFixed(1), y1: y, y2: y }, "reading"));
    f.svg.appendChild(svgEl("line", { x1: f.sx(r.x).toFixed(1), x2: f.sx(r.x).toFixed(1), y1: y, y2: f.bottom }, "reading"));
  }
  drawPoints(f, pts, fig.status, opts.pick);
  fig.put(f.svg);
  return fig.box;
}

/** The readings read back by INVERSE: x, its standard uncertainty and limits. */
export function renderInverse(newy: Float64Array, rows: readonly InverseRow[], level: number, replicates: number): HTMLElement {
  const box = el("section", undefined, "inverse");
  box.appendChild(el("h2", "Readings read back from the curve"));
  box.appendChild(el("p", `Each reading${replicates > 1 ? ` (the mean of ${replicates} readings)` : ""} with the x it corresponds to, its standard uncertainty and ${Math.round(level * 1000) / 10} % limits from the prediction band.`, "table-note"));
  const table = el("table");
  table.appendChild(headRow(["reading", "x", "standard uncertainty", "lower limit", "upper limit"]));
  const body = el("tbody");
  rows.forEach((r, t) => {
    const tr = el("tr");
    const th = el("th", fmt(newy[t]!, 6));
    th.setAttribute("scope", "row");
    tr.appendChild(th);
    for (const [v, d] of [[r.x, 6], [r.u, 4], [r.lower, 6], [r.upper, 6]] as [Quantity, number][]) tr.appendChild(qCell(el("td"), v, d));
    if (r.outside) tr.classList.add("outside");
    body.appendChild(tr);
  });
  table.appendChild(body);
  box.appendChild(scrollingTable(table, "Readings read back"));
  return box;
}

/** The LIMITS table, label beside value. */
export function renderLimits(values: readonly (Quantity | string)[]): HTMLElement {
  const E = engine();
  const box = el("section", undefined, "limits");
  box.appendChild(el("h2", "Detection and quantitation limits"));
  const dl = el("dl", undefined, "summary");
  E.LIMITS_LABELS.forEach((l, i) => {
    const row = el("div", undefined, "pair");
    row.appendChild(el("dt", l));
    row.appendChild(qCell(el("dd"), values[i]!, 4));
    dl.appendChild(row);
  });
  box.appendChild(dl);
  return box;
}

/** A LINEXY line: its table, findings and a plot with uncertainty bars in both directions. */
export function renderLineXY(target: HTMLElement, call: LineXYCall, rowNumber: (i: number) => number): void {
  const E = engine();
  const l = call.lineXY;
  target.replaceChildren();
  const layout = el("div", undefined, "layout");
  const main = el("div", undefined, "col main");
  const side = el("div", undefined, "col side");
  layout.append(main, side);
  target.appendChild(layout);
  main.appendChild(renderFindings(E.lineXYFindings(l), "What to know about this line"));
  const box = el("section", undefined, "coefs");
  box.appendChild(el("h2", "Line with uncertainties in x and y"));
  box.appendChild(el("p", `Estimates with standard uncertainties and ${Math.round(call.level * 1000) / 10} % limits (normal distribution; the uncertainties are the stated ones, propagated).`, "table-note"));
  const table = el("table");
  table.appendChild(headRow(["term", "estimate", "standard uncertainty", "lower limit", "upper limit"]));
  const body = el("tbody");
  for (const [name, v, u] of [
    ["intercept", l.intercept, l.uIntercept],
    ["slope", l.slope, l.uSlope],
  ] as [string, Quantity, Quantity][]) {
    const tr = el("tr");
    const th = el("th", name);
    th.setAttribute("scope", "row");
    tr.appendChild(th);
    tr.appendChild(qCell(el("td"), v));
    tr.appendChild(qCell(el("td"), u, 4));
    const lim = E.normalLimits(v, u, call.level);
    tr.appendChild(qCell(el("td"), lim.lower));
    tr.appendChild(qCell(el("td"), lim.upper));
    body.appendChild(tr);
  }
  table.appendChild(body);
  box.appendChild(scrollingTable(table, "Line with uncertainties in x and y"));
  const dl = el("dl", undefined, "summary");
  for (const [k, v] of [
    ["covariance of intercept and slope", l.covariance],
    ["χ² (weighted sum of squared distances)", l.chi2],
    ["degrees of freedom", l.df],
    ["p-value of χ²", l.p],
    ["iterations", l.iterations],
    ["rows used", l.used],
    ["rows skipped", l.skipped],
  ] as [string, Quantity][]) {
    const row = el("div", undefined, "pair");
    row.appendChild(el("dt", k));
    row.appendChild(qCell(el("dd"), v, 6, k.startsWith("p-value")));
    dl.appendChild(row);
  }
  box.appendChild(dl);
  main.appendChild(box);
  // plot: points with ±u bars in both directions, and the line
  if (typeof l.slope === "number" && typeof l.intercept === "number") {
    const fig = figure("Data with their uncertainties, and the line", "Bars show ± one standard uncertainty in x and in y; the line is the fitted one.", "linexy-plot");
    const idx = Array.from(l.rows);
    const xs = idx.map((i) => call.x[i]!);
    const ys = idx.map((i) => call.y[i]!);
    const x0 = Math.min(...idx.map((i) => call.x[i]! - call.ux[i]!));
    const x1 = Math.max(...idx.map((i) => call.x[i]! + call.ux[i]!));
    const y0 = Math.min(...idx.map((i) => call.y[i]! - call.uy[i]!), l.intercept + l.slope * x0, l.intercept + l.slope * x1);
    const y1 = Math.max(...idx.map((i) => call.y[i]! + call.uy[i]!), l.intercept + l.slope * x0, l.intercept + l.slope * x1);
    const f = frame([x0, x1], [y0, y1], "x", "y", `Data with uncertainty bars and the fitted line, ${idx.length} points`);
    drawLine(f, [x0, x1], [l.intercept + l.slope * x0, l.intercept + l.slope * x1], "curve");
    idx.forEach((i) => {
      const cx = f.sx(call.x[i]!);
      const cy = f.sy(call.y[i]!);
      f.svg.appendChild(svgEl("line", { x1: f.sx(call.x[i]! - call.ux[i]!).toFixed(1), x2: f.sx(call.x[i]! + call.ux[i]!).toFixed(1), y1: cy.toFixed(1), y2: cy.toFixed(1) }, "errbar"));
      f.svg.appendChild(svgEl("line", { x1: cx.toFixed(1), x2: cx.toFixed(1), y1: f.sy(call.y[i]! - call.uy[i]!).toFixed(1), y2: f.sy(call.y[i]! + call.uy[i]!).toFixed(1) }, "errbar"));
    });
    drawPoints(
      f,
      idx.map((i, t) => ({ x: xs[t]!, y: ys[t]!, row: rowNumber(i), index: i, label: `row ${rowNumber(i)}: x ${fmt(call.x[i]!, 5)} ± ${fmt(call.ux[i]!, 3)}, y ${fmt(call.y[i]!, 5)} ± ${fmt(call.uy[i]!, 3)}` })),
      fig.status,
    );
    fig.put(f.svg);
    side.appendChild(fig.box);
  }
}

export interface FitViewOptions {
  rowNumber?: (i: number) => number;
  title?: string;
  xNames?: readonly string[];
  yName?: string;
  where?: "sheet" | "preview";
  pick?: (i: number) => void;
  level?: number;
  newx?: { data: Float64Array; rows: number };
  newy?: Float64Array;
  /** Rows whose zeros may be empty cells (worksheet row numbers), when the host could not confirm. */
  possibleBlanks?: { rows: number[]; columns: string[] };
  /** Extra sections shown before the coefficients (INVERSE readings, LIMITS). */
  before?: HTMLElement[];
  readings?: { y: number; x: Quantity }[];
}

/** Everything for one fit: findings first (they say whether to trust the rest), then the tables and plots. */
export function renderFit(target: HTMLElement, model: Model, labels: readonly string[], opts: FitViewOptions = {}): Finding[] {
  const E = engine();
  target.replaceChildren();
  if (opts.title) target.appendChild(el("p", opts.title, "fit-title"));
  const rowNumber = opts.rowNumber ?? ((i: number) => i + 1);
  const list = E.findings({ fit: model.fit, labels, skipReason: (i) => model.skipReason(i, opts.xNames), rowNumber, weighting: model.weighting, where: opts.where ?? "sheet", newx: opts.newx, newy: opts.newy, possibleBlanks: opts.possibleBlanks });
  const layout = el("div", undefined, "layout");
  const main = el("div", undefined, "col main");
  const side = el("div", undefined, "col side");
  layout.append(main, side);
  target.appendChild(layout);
  main.appendChild(renderFindings(list));
  for (const b of opts.before ?? []) main.appendChild(b);
  if (model.fit.n >= model.fit.parameters && model.fit.n > 0) {
    main.appendChild(renderCoefficients(model, labels, opts.level ?? 0.95));
    main.appendChild(renderStats(model));
    const curve = renderCurvePlot(model, opts.xNames?.[0] ?? "x", opts.yName ?? "y", { rowNumber, pick: opts.pick }, opts.level ?? 0.95, opts.readings);
    if (curve) side.appendChild(curve);
    side.appendChild(renderResidualPlot(model, { rowNumber, pick: opts.pick }));
  }
  return list;
}
