/**
 * Start-up. office.js is loaded asynchronously (taskpane.html), so the page appears at once even
 * when its content delivery network stalls:
 * - office.js already here: wait for `Office.onReady` (however long it takes) and choose the mode
 *   by its host — the spreadsheet mode in Excel, else the preview;
 * - office.js not here yet: start the preview now; if office.js arrives later and reports Excel,
 *   pass the functions' associations to the host (functions.ts) and switch to the spreadsheet mode
 *   for the rest of the session.
 * (DEVELOPERS.md "Host requirements": why office.js is async, and the documentation pages.)
 */
/* global Office */
import { startExcel } from "./excel";
import { startPreview } from "./preview";
import { engine } from "./engine";

type ReadyInfo = { host: string | null };

function office(): typeof Office | null {
  const O = (globalThis as { Office?: typeof Office }).Office;
  return O && typeof O.onReady === "function" ? O : null;
}

export function startPane(): void {
  const app = document.getElementById("app")!;
  const mode = document.getElementById("mode")!;
  let current: "excel" | "preview" | null = null;
  const toExcel = (): void => {
    if (current === "excel") return;
    current = "excel";
    document.body.dataset.mode = "excel";
    mode.textContent = "connected to the workbook";
    startExcel(app);
  };
  const toPreview = (): void => {
    if (current) return;
    current = "preview";
    document.body.dataset.mode = "preview";
    mode.textContent = "preview";
    startPreview(app);
  };
  const whenReady = (O: typeof Office, late: boolean): void => {
    O.onReady()
      .then((i): ReadyInfo => ({ host: (i && (i.host as unknown as string)) || null }))
      .catch((): ReadyInfo => ({ host: null }))
      .then((info) => {
        const inExcel = info.host === "Excel" && typeof (globalThis as { Excel?: unknown }).Excel !== "undefined";
        if (inExcel) {
          if (late) engine().associateAll();
          toExcel();
        } else toPreview();
      });
  };
  const O = office();
  if (O) {
    mode.textContent = "connecting…";
    whenReady(O, false);
    return;
  }
  toPreview();
  const tag = document.getElementById("office-js");
  tag?.addEventListener("load", () => {
    const late = office();
    if (late) whenReady(late, true);
  });
}
