/**
 * The preview: the pane outside a spreadsheet. Pick a built-in example or paste data (header row,
 * first column y), choose intercept, degree and an optional weights column, and see the same
 * results the LSQ functions compute (same model builder, same findings engine).
 */
import { EXAMPLES, type Example } from "./examples";
import { parseTable, type Table } from "./parse";
import { el, outputRegion, renderFit } from "./render";
import { defaultLabels, getModel } from "../functions/model";
import { toSheetError } from "../functions/model";

let uid = 0;
function field(parent: HTMLElement, labelText: string, control: HTMLElement): HTMLElement {
  const id = `f${++uid}`;
  control.id = id;
  const wrap = el("div", undefined, "field");
  const lab = el("label", labelText);
  lab.htmlFor = id;
  wrap.append(lab, control);
  parent.appendChild(wrap);
  return wrap;
}

function tableText(ex: Example): string {
  return [ex.header.join("\t"), ...ex.rows.map((r) => r.map((c) => (c === null ? "" : String(c))).join("\t"))].join("\n");
}

export function startPreview(app: HTMLElement): void {
  app.replaceChildren();
  const intro = el("p", "Preview: no spreadsheet is connected, so this page fits the data below with the same functions the spreadsheet uses. Pick an example or paste your own data.", "intro");
  app.appendChild(intro);
  const form = el("form", undefined, "controls");
  form.setAttribute("aria-label", "Data and model");
  app.appendChild(form);

  const pick = el("select");
  pick.appendChild(new Option("Paste your own data", ""));
  for (const ex of EXAMPLES) pick.appendChild(new Option(ex.title, ex.id));
  field(form, "Example", pick);

  const data = el("textarea");
  data.rows = 8;
  data.spellcheck = false;
  data.placeholder = "y<TAB>x1<TAB>x2\n1.2<TAB>3<TAB>4\n…";
  field(form, "Data (tab- or comma-separated; header row; first column is y)", data);

  const row = el("div", undefined, "row");
  form.appendChild(row);
  const intercept = el("input");
  intercept.type = "checkbox";
  intercept.checked = true;
  field(row, "Intercept", intercept).classList.add("check");
  const degree = el("input");
  degree.type = "number";
  degree.min = "1";
  degree.max = "20";
  degree.step = "1";
  degree.value = "1";
  field(row, "Degree", degree);
  const weights = el("select");
  field(form, "Weights column (optional)", weights);

  const go = el("button", "Fit");
  go.type = "submit";
  form.appendChild(go);

  const out = app.appendChild(outputRegion());

  const refreshWeights = (t: Table, chosen?: string): void => {
    weights.replaceChildren(new Option("none", ""));
    t.header.slice(1).forEach((h, j) => weights.appendChild(new Option(h || `column ${j + 2}`, String(j + 1))));
    if (chosen) {
      const j = t.header.indexOf(chosen);
      if (j > 0) weights.value = String(j);
    }
  };

  pick.addEventListener("change", () => {
    const ex = EXAMPLES.find((e) => e.id === pick.value);
    if (!ex) return;
    data.value = tableText(ex);
    intercept.checked = ex.intercept;
    degree.value = String(ex.degree);
    refreshWeights(parseTable(data.value), ex.weights);
    run();
  });
  data.addEventListener("change", () => refreshWeights(parseTable(data.value)));

  const run = (): void => {
    const t = parseTable(data.value);
    out.replaceChildren();
    if (t.header.length < 2 || t.rows.length === 0) {
      out.appendChild(el("p", "Paste a header row and at least one data row, with y in the first column and one or more x columns after it.", "message"));
      return;
    }
    const wcol = weights.value === "" ? -1 : Number(weights.value);
    const xcols = t.header.map((_, j) => j).filter((j) => j > 0 && j !== wcol);
    const y = t.rows.map((r) => [r[0] ?? null]);
    const x = t.rows.map((r) => xcols.map((j) => r[j] ?? null));
    const w = wcol > 0 ? t.rows.map((r) => [r[wcol] ?? null]) : null;
    const deg = Number(degree.value);
    try {
      const model = getModel({ y, x, weights: w, intercept: intercept.checked, degree: deg });
      const xNames = xcols.map((j) => t.header[j] || `column ${j + 1}`);
      const labels = defaultLabels(intercept.checked, xcols.length, deg, xNames);
      renderFit(out, model, labels, { rowNumber: (i) => i + 1, xNames, title: `y = ${t.header[0] || "column 1"}; rows are numbered from the first data row.` });
    } catch (e) {
      const err = toSheetError(e);
      out.appendChild(el("p", `${err.code} ${err.message}`, "message error"));
    }
  };
  form.addEventListener("submit", (ev) => {
    ev.preventDefault();
    refreshWeightsKeep();
    run();
  });
  const refreshWeightsKeep = (): void => {
    const keep = weights.value;
    refreshWeights(parseTable(data.value));
    if ([...weights.options].some((o) => o.value === keep)) weights.value = keep;
  };
}
