/**
 * The pane inside the spreadsheet (shared runtime). When the selection moves to a cell that holds
 * or spills from an LSQ formula, the pane shows that fit: the functions record each call by
 * calling-cell address (src/functions/registry.ts), and the pane recomputes the model from the
 * recorded arguments (a cache hit) with column labels read from the header cell above each x column.
 *
 * Excel API calls used (and stood in for by the browser tests): Office.context.document.
 * addHandlerAsync(DocumentSelectionChanged), Excel.run with workbook.getActiveCell(),
 * range.getSpillParentOrNullObject(), worksheets.getItem(name).getRange(address),
 * range.getRow(0).getOffsetRange(-1, 0), worksheets.add(), range.values / range.formulas.
 */
/* global Excel, Office */
import { lookup, type FormulaRecord } from "../functions/registry";
import { defaultLabels, getModel, toSheetError, type FitArgs, type Model } from "../functions/model";
import { argumentIndex } from "../functions/signatures";
import { SheetError } from "../functions/cellerror";
import { el, outputRegion, renderFit } from "./render";
import { EXAMPLES } from "./examples";

function splitAddress(a: string): { sheet: string; local: string } | null {
  const i = a.lastIndexOf("!");
  if (i < 0) return null;
  return { sheet: a.slice(0, i).replace(/^'(.*)'$/, "$1").replace(/''/g, "'"), local: a.slice(i + 1) };
}

/** First row number of a local address such as "B2:D13" (1-based), or 1. */
function firstRow(local: string): number {
  const m = /[A-Z]+\$?(\d+)/i.exec(local.replace(/\$/g, ""));
  return m ? Number(m[1]) : 1;
}

/** Excel's error strings in range.values, read back as the error values the functions receive. */
const ERROR_TEXT = /^#(N\/A|VALUE!|DIV\/0!|REF!|NAME\?|NUM!|NULL!|SPILL!|CALC!|GETTING_DATA|FIELD!|BUSY!|CONNECT!|BLOCKED!|UNKNOWN!)$/;

/**
 * The fit a recorded formula computed: the record's weak reference while the fit cache still holds
 * it; otherwise the arguments again (ranges too large for the record are read by address), which
 * the fit cache then recognises by content.
 */
async function modelOf(rec: FormulaRecord): Promise<Model> {
  const alive = rec.ref?.deref() as Model | undefined;
  if (alive && "fit" in alive) return alive;
  const args: Record<string, unknown> = { ...rec.args };
  for (const name of rec.dropped) {
    const addr = rec.parameterAddresses[argumentIndex(rec.fn, name)];
    const parts = addr ? splitAddress(addr) : null;
    if (!parts) throw new SheetError("#N/A", `the ${name} argument is computed rather than a range, and too large to keep; recalculate the formula and select it again`);
    args[name] = await Excel.run(async (ctx) => {
      const range = ctx.workbook.worksheets.getItem(parts.sheet).getRange(parts.local);
      range.load("values");
      await ctx.sync();
      return (range.values as unknown[][]).map((row) => row.map((c) => (typeof c === "string" && ERROR_TEXT.test(c) ? { code: c } : c)));
    });
  }
  return getModel(args as unknown as FitArgs);
}

async function headerLabels(rec: FormulaRecord): Promise<string[] | null> {
  const xAddr = rec.parameterAddresses[argumentIndex(rec.fn, "x")];
  const parts = xAddr ? splitAddress(xAddr) : null;
  if (!parts) return null;
  try {
    return await Excel.run(async (ctx) => {
      const range = ctx.workbook.worksheets.getItem(parts.sheet).getRange(parts.local);
      const above = range.getRow(0).getOffsetRange(-1, 0);
      above.load("values");
      await ctx.sync();
      const v = (above.values[0] ?? []) as unknown[];
      return v.map((c, j) => (typeof c === "string" && c.trim() !== "" ? c.trim() : `column ${j + 1} of x`));
    });
  } catch {
    return null; // x starts in row 1, or the sheet was renamed: fall back to generic labels
  }
}

export function startExcel(app: HTMLElement): void {
  app.replaceChildren();
  const tools = el("div", undefined, "row tools");
  const insert = el("button", "Insert example");
  insert.type = "button";
  insert.title = "Adds a worksheet with invented data and one formula for each LSQ function";
  tools.appendChild(insert);
  app.appendChild(tools);
  const status = el("p", "Select a cell that holds an LSQ formula, or one of its results.", "message");
  status.id = "status";
  app.appendChild(status);
  const out = app.appendChild(outputRegion());

  insert.addEventListener("click", () => {
    insertExample().catch((e: unknown) => (status.textContent = `Could not insert the example: ${e instanceof Error ? e.message : String(e)}`));
  });

  const show = async (): Promise<void> => {
    const where = await Excel.run(async (ctx) => {
      const cell = ctx.workbook.getActiveCell();
      cell.load("address,formulas");
      const parent = cell.getSpillParentOrNullObject();
      parent.load("address,formulas");
      await ctx.sync();
      const formula = String((parent.isNullObject ? cell.formulas : parent.formulas)?.[0]?.[0] ?? "");
      return { address: cell.address, anchor: parent.isNullObject ? null : parent.address, formula };
    });
    const rec = (where.anchor ? lookup(where.anchor) : undefined) ?? lookup(where.address);
    if (!rec) {
      const fn = /^=\s*LSQ\.(\w+)\s*\(/i.exec(where.formula)?.[1];
      status.textContent = fn
        ? `${where.anchor ?? where.address} holds LSQ.${fn.toUpperCase()}, but it has not been calculated since the add-in started. Recalculate it (edit the cell and press Enter, or recalculate the workbook) and the pane will explain it.`
        : `${where.address} does not hold an LSQ formula. Select a cell with one (or one of its results) to see its fit explained.`;
      out.replaceChildren();
      return;
    }
    try {
      const model = await modelOf(rec);
      const header = await headerLabels(rec);
      // Header cells above x name the columns; without a header row, "column 3 of x".
      const names = header ?? Array.from({ length: model.fit.shape.k }, (_, j) => (model.fit.shape.degree >= 2 ? "x" : `column ${j + 1} of x`));
      const labels = defaultLabels(model.fit.spec.intercept, model.fit.shape.k, model.fit.shape.degree, names);
      const yAt = rec.parameterAddresses[argumentIndex(rec.fn, "y")];
      const yAddr = yAt ? splitAddress(yAt) : null;
      const row0 = yAddr ? firstRow(yAddr.local) : 1;
      status.textContent = `LSQ.${rec.fn} in ${rec.address}`;
      renderFit(out, model, labels, { rowNumber: (i) => row0 + i, xNames: names, title: "Row numbers are worksheet rows." });
    } catch (e) {
      const err = toSheetError(e);
      status.textContent = `LSQ.${rec.fn} in ${rec.address} shows ${err.code}: ${err.message}`;
      out.replaceChildren();
    }
  };

  const safeShow = (): void => {
    show().catch((e: unknown) => (status.textContent = `Could not read the selection: ${e instanceof Error ? e.message : String(e)}`));
  };
  Office.context.document.addHandlerAsync(Office.EventType.DocumentSelectionChanged, safeShow);
  safeShow();
}

/** A new worksheet with the dependent-columns example and one formula for each LSQ function. */
async function insertExample(): Promise<void> {
  const ex = EXAMPLES.find((e) => e.id === "dependent")!;
  await Excel.run(async (ctx) => {
    const sheets = ctx.workbook.worksheets;
    sheets.load("items/name");
    await ctx.sync();
    const names = new Set(sheets.items.map((s) => s.name));
    let name = "Colspace example";
    for (let i = 2; names.has(name); i++) name = `Colspace example ${i}`;
    const sh = sheets.add(name);
    const n = ex.rows.length;
    const last = n + 1;
    sh.getRange(`A1:D${last}`).values = [ex.header.slice(), ...ex.rows.map((r) => r.slice())] as (string | number)[][];
    const Y = `A2:A${last}`;
    const X = `B2:D${last}`;
    const put = (label: string, at: string, formula: string, col: string, row: number): void => {
      sh.getRange(`${col}${row - 1}`).values = [[label]];
      sh.getRange(at).formulas = [[formula]];
    };
    put("LSQ.COEF", "F2", `=LSQ.COEF(${Y},${X})`, "F", 2);
    put("LSQ.PARAMS", "H2", `=LSQ.PARAMS(${Y},${X})`, "H", 2);
    put("LSQ.COV", "F8", `=LSQ.COV(${Y},${X})`, "F", 8);
    put("LSQ.STATS", "O2", `=LSQ.STATS(${Y},${X})`, "O", 2);
    put("LSQ.FITTED", "R2", `=LSQ.FITTED(${Y},${X})`, "R", 2);
    put("LSQ.RESID", "S2", `=LSQ.RESID(${Y},${X})`, "S", 2);
    put("LSQ.INFLUENCE", "U2", `=LSQ.INFLUENCE(${Y},${X})`, "U", 2);
    put("LSQ.PREDICT", "F14", `=LSQ.PREDICT(B${last - 1}:D${last},${Y},${X},,,,"prediction")`, "F", 14);
    put("LSQ.CHECK", "F19", `=LSQ.CHECK(${Y},${X})`, "F", 19);
    sh.getRange("A1:Z1").format.font.bold = true;
    sh.activate();
    sh.getRange("F19").select();
    await ctx.sync();
  });
}
