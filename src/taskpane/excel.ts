/**
 * The pane inside the spreadsheet (shared runtime). When the selection moves to a cell that holds
 * or spills from an LSQ formula, the pane shows that fit: the functions record each call by
 * calling-cell address (functions/registry.ts) with a weak reference to its fit, and the pane
 * reuses that fit — or, once the fit cache has let it go, reads the arguments again by address
 * and the cache recognizes them by content.
 *
 * Host decisions (DEVELOPERS.md "Host requirements" gives the documentation pages):
 * - `range.getSpillParentOrNullObject()` needs ExcelApi 1.12: checked with
 *   `Office.context.requirements.isSetSupported`; without it the pane looks only at the selected
 *   cell itself;
 * - no selection work while the pane is hidden (`Office.addin.onVisibilityModeChanged`, shared
 *   runtime; the page's visibility as a fallback): one refresh when it is shown again;
 * - clicking a plotted point selects that worksheet row; the pane keeps its explanation.
 */
/* global Excel, Office */
import type { FormulaRecord } from "../functions/registry";
import type { FitArgs, Model } from "../functions/model";
import type { LineXYCall } from "../functions/calibrate";
import { el, outputRegion, renderFit, renderInverse, renderLimits, renderLineXY } from "./render";
import { EXAMPLES, type Example } from "./examples";
import { engine } from "./engine";

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

/** A recorded call's arguments, with ranges too large for the record read again by address. */
async function argumentsOf(rec: FormulaRecord): Promise<Record<string, unknown>> {
  const E = engine();
  const args: Record<string, unknown> = { ...rec.args };
  for (const name of rec.dropped) {
    const addr = rec.parameterAddresses[E.argumentIndex(rec.fn, name)];
    const parts = addr ? splitAddress(addr) : null;
    if (!parts) throw new Error(`the ${name} argument is computed rather than a range, and too large to keep; recalculate the formula and select it again`);
    args[name] = await Excel.run(async (ctx) => {
      const range = ctx.workbook.worksheets.getItem(parts.sheet).getRange(parts.local);
      range.load("values");
      await ctx.sync();
      return (range.values as unknown[][]).map((row) => row.map((c) => (typeof c === "string" && ERROR_TEXT.test(c) ? { code: c } : c)));
    });
  }
  return args;
}

async function headerLabels(rec: FormulaRecord): Promise<string[] | null> {
  const xAddr = rec.parameterAddresses[engine().argumentIndex(rec.fn, "x")];
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

function spillSupported(): boolean {
  try {
    return Office.context.requirements.isSetSupported("ExcelApi", "1.12");
  } catch {
    return false;
  }
}

export function startExcel(app: HTMLElement): void {
  app.replaceChildren();
  const E = engine();
  const tools = el("div", undefined, "row tools");
  const insert = el("button", "Insert example");
  insert.type = "button";
  insert.title = "Adds a worksheet with invented data and one formula for each fitting function";
  const insertCal = el("button", "Insert calibration example");
  insertCal.type = "button";
  insertCal.title = "Adds a worksheet with invented calibration standards, two unknown samples and the calibration functions";
  tools.append(insert, insertCal);
  app.appendChild(tools);
  const status = el("p", "Select a cell that holds an LSQ formula, or one of its results.", "message");
  status.id = "status";
  app.appendChild(status);
  const problem = el("p", "", "message error");
  problem.id = "problem";
  problem.setAttribute("role", "alert");
  problem.hidden = true;
  app.appendChild(problem);
  const out = app.appendChild(outputRegion());
  const showProblem = (text: string): void => {
    problem.textContent = text;
    problem.hidden = text === "";
  };

  const guardClick = (f: () => Promise<void>) => (): void => {
    f().catch((e: unknown) => showProblem(`Could not insert the example: ${e instanceof Error ? e.message : String(e)}`));
  };
  insert.addEventListener("click", guardClick(() => insertExample(EXAMPLES.find((e) => e.id === "dependent")!, false)));
  insertCal.addEventListener("click", guardClick(() => insertExample(EXAMPLES.find((e) => e.id === "photometer")!, true)));

  let keepUntil = 0; // a plotted point was clicked: its row selection keeps the explanation

  const show = async (): Promise<void> => {
    if (Date.now() < keepUntil) return;
    const spill = spillSupported();
    const where = await Excel.run(async (ctx) => {
      const cell = ctx.workbook.getActiveCell();
      cell.load("address,formulas");
      const parent = spill ? cell.getSpillParentOrNullObject() : null;
      parent?.load("address,formulas");
      await ctx.sync();
      const anchor = parent && !parent.isNullObject ? parent : null;
      const formula = String((anchor ? anchor.formulas : cell.formulas)?.[0]?.[0] ?? "");
      return { address: cell.address, anchor: anchor ? anchor.address : null, formula };
    });
    const rec = (where.anchor ? E.lookup(where.anchor) : undefined) ?? E.lookup(where.address);
    showProblem("");
    if (!rec) {
      const fn = /^=\s*LSQ\.(\w+)\s*\(/i.exec(where.formula)?.[1];
      status.textContent = fn
        ? `${where.anchor ?? where.address} holds LSQ.${fn.toUpperCase()}, but it has not been calculated since the add-in started. Recalculate it (edit the cell and press Enter, or recalculate the workbook) and the pane will explain it.`
        : `${where.address} does not hold an LSQ formula. Select a cell with one (or one of its results) to see its fit explained.`;
      out.replaceChildren();
      return;
    }
    status.textContent = `LSQ.${rec.fn} in ${rec.address}`;
    try {
      const yAt = rec.parameterAddresses[E.argumentIndex(rec.fn, "y")];
      const yAddr = yAt ? splitAddress(yAt) : null;
      const row0 = yAddr ? firstRow(yAddr.local) : 1;
      const rowNumber = (i: number): number => row0 + i;
      const pick = yAddr
        ? (i: number): void => {
            keepUntil = Date.now() + 1500;
            void Excel.run(async (ctx) => {
              ctx.workbook.worksheets.getItem(yAddr.sheet).getRange(`${row0 + i}:${row0 + i}`).select();
              await ctx.sync();
            }).catch(() => undefined);
          }
        : undefined;
      const alive = rec.ref?.deref() as Model | LineXYCall | undefined;
      if (rec.fn === "LINEXY") {
        const call = alive && "lineXY" in alive ? alive : E.lineXYOf((await argumentsOf(rec)) as never);
        renderLineXY(out, call, rowNumber);
        return;
      }
      const liveModel = alive && "fit" in alive ? alive : null;
      // The arguments in full (large ones read by address) when the fit has to be found again or a
      // calibration function recomputes from them; else the record's own small arguments serve.
      const needsAll = rec.dropped.length > 0 && (!liveModel || rec.fn === "INVERSE" || rec.fn === "LIMITS");
      const full = needsAll ? await argumentsOf(rec) : { ...rec.args };
      const model = liveModel ?? E.getModel(full as unknown as FitArgs);
      const header = await headerLabels(rec);
      const names = header ?? Array.from({ length: model.fit.shape.k }, (_, j) => (model.fit.shape.degree >= 2 ? "x" : `column ${j + 1} of x`));
      const labels = E.defaultLabels(model.fit.spec.intercept, model.fit.shape.k, model.fit.shape.degree, names);
      const before: HTMLElement[] = [];
      let newy: Float64Array | undefined;
      let newx: { data: Float64Array; rows: number } | undefined;
      let readings: { y: number; x: number | { na: string } }[] | undefined;
      if (rec.fn === "INVERSE") {
        const inv = E.inverseOf(full as never);
        newy = inv.newy;
        before.push(renderInverse(inv.newy, inv.rows, inv.level, inv.replicates));
        readings = inv.rows.map((r, t) => ({ y: inv.newy[t]!, x: r.x }));
      } else if (rec.fn === "LIMITS") before.push(renderLimits(E.limitsOf(full as never).values));
      if ((rec.fn === "PREDICT" || rec.fn === "CHECK") && full.newx) newx = E.readNewX(model, full.newx, "newx");
      if (rec.fn === "CHECK" && full.newy) newy = Float64Array.from((full.newy as unknown[][]).flat(), (v) => (typeof v === "number" ? v : NaN));
      const blanks = rec.possibleBlanks ? { rows: rec.possibleBlanks.rows.map((r) => row0 + r - 1), columns: rec.possibleBlanks.columns } : undefined;
      renderFit(out, model, labels, { rowNumber, xNames: names, title: "Row numbers are worksheet rows.", pick, before, newx, newy, readings, possibleBlanks: blanks, level: typeof full.level === "number" ? full.level : 0.95 });
    } catch (e) {
      const err = E.toSheetError(e);
      showProblem(`LSQ.${rec.fn} in ${rec.address} shows ${err.code}: ${err.message}`);
      out.replaceChildren();
    }
  };

  let visible = true;
  let pending = false;
  const safeShow = (): void => {
    if (!visible || (typeof document !== "undefined" && document.visibilityState === "hidden")) {
      pending = true; // refresh once when the pane is shown again
      return;
    }
    pending = false;
    show().catch((e: unknown) => showProblem(`Could not read the selection: ${e instanceof Error ? e.message : String(e)}`));
  };
  const onShown = (): void => {
    if (pending) safeShow();
  };
  try {
    const addin = (Office as unknown as { addin?: { onVisibilityModeChanged?: (h: (a: { visibilityMode: string }) => void) => unknown } }).addin;
    addin?.onVisibilityModeChanged?.((a) => {
      visible = a.visibilityMode !== "Hidden";
      if (visible) onShown();
    });
  } catch {
    // not available in this host: the page's own visibility serves
  }
  document.addEventListener("visibilitychange", () => {
    if (document.visibilityState === "visible") onShown();
  });
  Office.context.document.addHandlerAsync(Office.EventType.DocumentSelectionChanged, safeShow);
  safeShow();
}

/** A new worksheet with an example's data and formulas for the functions that fit it. */
async function insertExample(ex: Example, calibration: boolean): Promise<void> {
  await Excel.run(async (ctx) => {
    const sheets = ctx.workbook.worksheets;
    sheets.load("items/name");
    await ctx.sync();
    const names = new Set(sheets.items.map((s) => s.name));
    const base = calibration ? "Colspace calibration" : "Colspace example";
    let name = base;
    for (let i = 2; names.has(name); i++) name = `${base} ${i}`;
    const sh = sheets.add(name);
    const n = ex.rows.length;
    const last = n + 1;
    const width = ex.header.length;
    const lastCol = String.fromCharCode(64 + width);
    sh.getRange(`A1:${lastCol}${last}`).values = [ex.header.slice(), ...ex.rows.map((r) => r.slice())] as (string | number)[][];
    const Y = `A2:A${last}`;
    const X = `B2:${lastCol}${last}`;
    const put = (label: string, at: string, formula: string): void => {
      const col = at.replace(/\d+$/, "");
      const row = Number(at.replace(/^[A-Z]+/, ""));
      sh.getRange(`${col}${row - 1}`).values = [[label]];
      sh.getRange(at).formulas = [[formula]];
    };
    if (calibration) {
      const r = ex.readings ?? [];
      sh.getRange("D1").values = [["unknown readings"]];
      sh.getRange(`D2:D${r.length + 1}`).values = r.map((v) => [v]);
      const R = `D2:D${r.length + 1}`;
      put("LSQ.INVERSE", "F2", `=LSQ.INVERSE(${R},${Y},${X},,TRUE,${ex.degree},,,,TRUE)`);
      put("LSQ.GOF (straight line)", "F7", `=LSQ.GOF(${Y},${X})`);
      put("LSQ.CHECK (straight line)", "I7", `=LSQ.CHECK(${Y},${X})`);
      put("LSQ.PARAMS", "F22", `=LSQ.PARAMS(${Y},${X},,TRUE,${ex.degree},,TRUE)`);
      put("LSQ.LIMITS (straight line, low standards)", "F28", `=LSQ.LIMITS(A2:A9,B2:B9)`);
      put("LSQ.CHECK", "I28", `=LSQ.CHECK(${Y},${X},,TRUE,${ex.degree},,,${R})`);
    } else {
      put("LSQ.COEF", "F2", `=LSQ.COEF(${Y},${X})`);
      put("LSQ.PARAMS", "H2", `=LSQ.PARAMS(${Y},${X})`);
      put("LSQ.COV", "F8", `=LSQ.COV(${Y},${X})`);
      put("LSQ.STATS", "O2", `=LSQ.STATS(${Y},${X})`);
      put("LSQ.FITTED", "R2", `=LSQ.FITTED(${Y},${X})`);
      put("LSQ.RESID", "S2", `=LSQ.RESID(${Y},${X})`);
      put("LSQ.INFLUENCE", "U2", `=LSQ.INFLUENCE(${Y},${X})`);
      put("LSQ.PREDICT", "F14", `=LSQ.PREDICT(B${last - 1}:${lastCol}${last},${Y},${X},,,,"prediction")`);
      put("LSQ.CHECK", "F19", `=LSQ.CHECK(${Y},${X})`);
    }
    sh.getRange("A1:Z1").format.font.bold = true;
    sh.activate();
    sh.getRange(calibration ? "F2" : "F19").select();
    await ctx.sync();
  });
}
