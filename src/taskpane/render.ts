/**
 * Rendering a fit into the pane. Every piece of text — including labels that came from the
 * workbook or from pasted data — is set with textContent or createTextNode, never as HTML.
 */
import type { Model } from "../functions/model";
import { findings, type Finding, type Part } from "../findings/findings";
import { formatNumber } from "../findings/findings";
import type { Quantity } from "../core/errors";
import { RowStatus } from "../core/design";
import { statsLabels } from "../functions/lsq";

const SVG = "http://www.w3.org/2000/svg";

/** Create an element with text content and an optional class. */
export function el<K extends keyof HTMLElementTagNameMap>(tag: K, text?: string, cls?: string): HTMLElementTagNameMap[K] {
  const e = document.createElement(tag);
  if (text !== undefined) e.textContent = text;
  if (cls) e.className = cls;
  return e;
}

function qText(q: Quantity, digits = 6): string {
  return typeof q === "number" ? formatNumber(q, digits) : "n/a";
}

/** The live region where a fit is rendered (announced to screen readers when it changes). */
export function outputRegion(): HTMLElement {
  const out = el("div", undefined, "output");
  out.id = "output";
  out.setAttribute("aria-live", "polite");
  return out;
}

/** Render finding parts as text nodes (labels emphasised). */
function renderParts(parent: HTMLElement, parts: readonly Part[]): void {
  for (const p of parts) {
    if (p.kind === "label") parent.appendChild(el("strong", p.text));
    else parent.appendChild(document.createTextNode(p.text));
  }
}

export function renderFindings(list: readonly Finding[]): HTMLElement {
  const box = el("section", undefined, "findings");
  box.setAttribute("aria-label", "Findings");
  box.appendChild(el("h2", "What to know about this fit"));
  const ul = el("ul");
  for (const f of list) {
    const li = el("li", undefined, `finding ${f.severity}`);
    li.dataset.finding = f.id;
    const sev = el("span", f.severity === "ok" ? "OK" : f.severity === "problem" ? "Problem" : f.severity === "warning" ? "Warning" : "Note", "sev");
    li.appendChild(sev);
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

export function renderCoefficients(model: Model, labels: readonly string[], level = 0.95): HTMLElement {
  const box = el("section", undefined, "coefs");
  box.appendChild(el("h2", "Coefficients"));
  box.appendChild(el("p", `Estimates with standard errors, p-values and ${Math.round(level * 100)} % confidence limits (the table scrolls sideways on narrow panes).`, "table-note"));
  const table = el("table");
  table.setAttribute("aria-label", "Coefficients");
  const head = el("tr");
  for (const h of ["term", "estimate", "std. error", "p-value", "lower", "upper"]) {
    const th = el("th", h);
    th.setAttribute("scope", "col");
    head.appendChild(th);
  }
  table.appendChild(el("thead")).appendChild(head);
  const body = el("tbody");
  const rows = model.fit.parameterTable(level);
  rows.forEach((r, j) => {
    const tr = el("tr");
    const th = el("th", labels[j] ?? `term ${j + 1}`);
    th.setAttribute("scope", "row");
    tr.appendChild(th);
    if (typeof r.estimate !== "number") {
      const td = el("td", "not identifiable (#N/A)", "na");
      td.colSpan = 5;
      tr.appendChild(td);
    } else for (const v of [r.estimate, r.standardError, r.p, r.lower, r.upper]) tr.appendChild(el("td", qText(v), typeof v === "number" ? "num" : "na"));
    body.appendChild(tr);
  });
  table.appendChild(body);
  box.appendChild(table);
  return box;
}

export function renderStats(model: Model): HTMLElement {
  const box = el("section", undefined, "stats");
  box.appendChild(el("h2", "Fit summary"));
  const s = model.fit.statistics();
  const labels = statsLabels(s.centered, !!model.fit.spec.weights);
  const values: Quantity[] = [s.observationsUsed, s.observationsSkipped, s.parameters, s.rank, s.residualDf, s.rss, s.sigma, s.rSquared, s.adjRSquared, s.fStatistic, s.fPValue, s.conditionNumber, s.logLikelihood, s.aic, s.bic];
  const dl = el("dl");
  values.forEach((v, i) => {
    dl.appendChild(el("dt", labels[i]!));
    const dd = el("dd", qText(v), typeof v === "number" ? "num" : "na");
    if (typeof v !== "number") dd.title = v.na;
    dl.appendChild(dd);
  });
  box.appendChild(dl);
  return box;
}

/** Residuals against fitted values, one point per used row. */
export function renderResidualPlot(model: Model, rowNumber: (i: number) => number = (i) => i + 1): HTMLElement {
  const box = el("section", undefined, "plot");
  box.appendChild(el("h2", "Residuals against fitted values"));
  const { fitted, resid } = model.fit.fittedAndResiduals();
  const pts: [number, number, number][] = [];
  model.fit.status.forEach((st, i) => {
    if (st === RowStatus.Used) pts.push([fitted[i]!, resid[i]!, i]);
  });
  const W = 300;
  const H = 180;
  const pad = 28;
  const svg = document.createElementNS(SVG, "svg");
  svg.setAttribute("viewBox", `0 0 ${W} ${H}`);
  svg.setAttribute("role", "img");
  svg.setAttribute("aria-label", `Residuals against fitted values, ${pts.length} points`);
  svg.classList.add("residual-plot");
  const xs = pts.map((p) => p[0]);
  const ys = pts.map((p) => p[1]);
  const x0 = Math.min(...xs, 0 + (xs.length ? Math.min(...xs) : 0));
  const x1 = Math.max(...xs, x0 + 1e-300);
  const ymax = Math.max(1e-300, ...ys.map(Math.abs));
  const sx = (v: number): number => pad + ((v - x0) / (x1 - x0 || 1)) * (W - 2 * pad);
  const sy = (v: number): number => H / 2 - (v / ymax) * (H / 2 - pad / 2);
  const axis = document.createElementNS(SVG, "line");
  axis.setAttribute("x1", String(pad));
  axis.setAttribute("x2", String(W - pad / 2));
  axis.setAttribute("y1", String(H / 2));
  axis.setAttribute("y2", String(H / 2));
  axis.setAttribute("class", "zero");
  svg.appendChild(axis);
  for (const [fx, ry, i] of pts) {
    const c = document.createElementNS(SVG, "circle");
    c.setAttribute("cx", sx(fx).toFixed(2));
    c.setAttribute("cy", sy(ry).toFixed(2));
    c.setAttribute("r", "3");
    c.setAttribute("class", "pt");
    const t = document.createElementNS(SVG, "title");
    t.textContent = `row ${rowNumber(i)}: fitted ${formatNumber(fx, 5)}, residual ${formatNumber(ry, 4)}`;
    c.appendChild(t);
    svg.appendChild(c);
  }
  const lab = document.createElementNS(SVG, "text");
  lab.setAttribute("x", String(pad));
  lab.setAttribute("y", String(H - 4));
  lab.setAttribute("class", "axis-label");
  lab.textContent = `fitted ${formatNumber(x0, 4)} … ${formatNumber(x1, 4)}; residuals within ±${formatNumber(ymax, 3)}`;
  svg.appendChild(lab);
  box.appendChild(svg);
  return box;
}

/** Everything for one fit: findings first (they say whether to trust the rest), then the tables. */
export function renderFit(target: HTMLElement, model: Model, labels: readonly string[], opts: { rowNumber?: (i: number) => number; title?: string; xNames?: readonly string[] } = {}): Finding[] {
  target.replaceChildren();
  if (opts.title) target.appendChild(el("p", opts.title, "fit-title"));
  const list = findings({ fit: model.fit, labels, skipReason: (i) => model.skipReason(i, opts.xNames), rowNumber: opts.rowNumber });
  target.appendChild(renderFindings(list));
  if (model.fit.n >= model.fit.parameters && model.fit.n > 0) {
    target.appendChild(renderCoefficients(model, labels));
    target.appendChild(renderStats(model));
    target.appendChild(renderResidualPlot(model, opts.rowNumber));
  }
  return list;
}
