/**
 * The preview: the pane outside a spreadsheet. Pick a built-in example or paste data (first
 * column y), choose intercept, degree and an optional weights column, optionally give readings
 * of unknown samples, and see what the LSQ functions compute for the same numbers (the same
 * engine, findings and reasons).
 */
import { EXAMPLES, type Example } from "./examples";
import { parseTable, type Table } from "./parse";
import { el, outputRegion, renderFit, renderInverse } from "./render";
import { engine } from "./engine";

let uid = 0;
function field(parent: HTMLElement, labelText: string, control: HTMLElement, hint?: string): HTMLElement {
  const id = `f${++uid}`;
  control.id = id;
  const wrap = el("div", undefined, "field");
  const lab = el("label", labelText);
  lab.htmlFor = id;
  wrap.append(lab, control);
  if (hint) {
    const h = el("p", hint, "hint");
    h.id = `${id}-hint`;
    control.setAttribute("aria-describedby", h.id);
    wrap.appendChild(h);
  }
  parent.appendChild(wrap);
  return wrap;
}

function tableText(ex: Example): string {
  return [ex.header.join("\t"), ...ex.rows.map((r) => r.map((c) => (c === null ? "" : String(c))).join("\t"))].join("\n");
}

/** Numbers from free text: separated by spaces, semicolons or line breaks (commas too when no decimal comma is used). */
function readingsOf(text: string): number[] {
  const t = text.trim();
  if (t === "") return [];
  const decimalComma = /\d,\d/.test(t) && /[;\s]/.test(t) && !/\d\.\d/.test(t);
  return t
    .split(decimalComma ? /[;\s]+/ : /[;,\s]+/)
    .filter((c) => c !== "")
    .map((c) => Number((decimalComma ? c.replace(",", ".") : c).replace(/^−/, "-")));
}

export function startPreview(app: HTMLElement): void {
  app.replaceChildren();
  const E = engine();
  const intro = el("p", "Preview: no workbook is connected, so this page fits the data below with the same engine the LSQ functions use. Pick an example or paste your own data.", "intro");
  app.appendChild(intro);
  const shell = el("div", undefined, "preview-shell");
  app.appendChild(shell);
  const form = el("form", undefined, "controls");
  form.setAttribute("aria-label", "Data and model");
  shell.appendChild(form);

  const pick = el("select");
  pick.appendChild(new Option("Paste your own data", ""));
  for (const ex of EXAMPLES) pick.appendChild(new Option(ex.title, ex.id));
  field(form, "Example", pick);
  const desc = el("p", "", "example-desc");
  desc.id = "example-desc";
  desc.hidden = true;
  form.appendChild(desc);

  const data = el("textarea");
  data.rows = 8;
  data.spellcheck = false;
  data.placeholder = "y\tx1\tx2\n1.2\t3\t4\n…";
  field(form, "Data (tabs, semicolons or commas between cells; first column y)", data, "A header row is optional: a first row of numbers is read as data. Decimal commas are read when cells are separated by tabs or semicolons.");

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
  const weighting = el("select");
  weighting.append(new Option("relative weights", "relative"), new Option("standard uncertainties of y", "uncertainty"));
  field(form, "The weights column holds", weighting);
  const readings = el("input");
  readings.type = "text";
  readings.inputMode = "decimal";
  field(form, "Readings of unknown samples (optional)", readings, "Read back from the fitted curve (one x column only): the estimated x, its uncertainty and limits. Separate readings with spaces or semicolons.");

  const go = el("button", "Fit");
  go.type = "submit";
  form.appendChild(go);

  const notes = el("div", undefined, "parse-notes");
  notes.setAttribute("aria-live", "polite");
  shell.appendChild(notes);
  const out = shell.appendChild(outputRegion());

  const refreshWeights = (t: Table, chosen?: string): void => {
    const keep = weights.value;
    weights.replaceChildren(new Option("none", ""));
    t.header.slice(1).forEach((h, j) => weights.appendChild(new Option(h || `column ${j + 2}`, String(j + 1))));
    if (chosen) {
      const j = t.header.indexOf(chosen);
      if (j > 0) weights.value = String(j);
    } else if ([...weights.options].some((o) => o.value === keep)) weights.value = keep;
  };

  pick.addEventListener("change", () => {
    const ex = EXAMPLES.find((e) => e.id === pick.value);
    desc.hidden = !ex;
    desc.textContent = ex ? ex.description : "";
    if (!ex) return;
    data.value = tableText(ex);
    intercept.checked = ex.intercept;
    degree.value = String(ex.degree);
    readings.value = (ex.readings ?? []).join("  ");
    weighting.value = "relative";
    refreshWeights(parseTable(data.value), ex.weights);
    run();
  });
  data.addEventListener("change", () => refreshWeights(parseTable(data.value)));

  const run = (): void => {
    const t = parseTable(data.value);
    out.replaceChildren();
    notes.replaceChildren(...t.notes.map((n) => el("p", n, "note")));
    if (t.header.length < 2 || t.rows.length === 0) {
      out.appendChild(el("p", "Paste at least one row of data, with y in the first column and one or more x columns after it.", "message"));
      return;
    }
    const wcol = weights.value === "" ? -1 : Number(weights.value);
    const xcols = t.header.map((_, j) => j).filter((j) => j > 0 && j !== wcol);
    const y = t.rows.map((r) => [r[0] ?? null]);
    const x = t.rows.map((r) => xcols.map((j) => r[j] ?? null));
    const w = wcol > 0 ? t.rows.map((r) => [r[wcol] ?? null]) : null;
    const deg = Number(degree.value);
    const args = { y, x, weights: w, intercept: intercept.checked, degree: deg, weighting: weighting.value };
    try {
      const model = E.getModel(args);
      const xNames = xcols.map((j) => t.header[j] || `column ${j + 1}`);
      const labels = E.defaultLabels(intercept.checked, xcols.length, deg, xNames);
      const rs = readingsOf(readings.value);
      const before: HTMLElement[] = [];
      let newy: Float64Array | undefined;
      let marks: { y: number; x: number | { na: string } }[] | undefined;
      if (rs.length > 0) {
        if (rs.some((v) => !Number.isFinite(v))) before.push(el("p", "Some readings are not numbers; write them as numbers separated by spaces or semicolons.", "message error"));
        else if (xcols.length !== 1) before.push(el("p", "Readings can be read back only through a calibration with one x column.", "message error"));
        else {
          const inv = E.inverseOf({ ...args, newy: rs.map((v) => [v]) });
          newy = inv.newy;
          before.push(renderInverse(inv.newy, inv.rows, inv.level, inv.replicates));
          marks = inv.rows.map((r, i) => ({ y: rs[i]!, x: r.x }));
        }
      }
      renderFit(out, model, labels, {
        rowNumber: (i) => i + 1,
        xNames,
        yName: t.header[0] || "y",
        where: "preview",
        title: `y is ${t.header[0] || "column 1"}; rows are numbered from the first data row.`,
        newy,
        before,
        readings: marks,
      });
    } catch (e) {
      const err = E.toSheetError(e);
      const p = el("p", undefined, "message error");
      p.setAttribute("role", "alert");
      p.append(el("strong", `${err.code} `), document.createTextNode(err.message));
      out.appendChild(p);
    }
  };
  form.addEventListener("submit", (ev) => {
    ev.preventDefault();
    refreshWeights(parseTable(data.value));
    run();
  });
}
