/**
 * Start-up: inside the spreadsheet host the pane follows the selection; anywhere else (a plain
 * browser, or office.js unavailable offline) it becomes the preview. It never waits more than
 * OFFICE_WAIT_MS for office.js.
 */
/* global Office */
import { startExcel } from "./excel";
import { startPreview } from "./preview";

export const OFFICE_WAIT_MS = 2500;

type ReadyInfo = { host: string | null } | null;

function officeReady(): Promise<ReadyInfo> {
  const O = (globalThis as { Office?: typeof Office }).Office;
  if (!O || typeof O.onReady !== "function") return Promise.resolve(null);
  return Promise.race([
    O.onReady().then((i) => ({ host: (i && (i.host as unknown as string)) || null })),
    new Promise<ReadyInfo>((res) => setTimeout(() => res(null), OFFICE_WAIT_MS)),
  ]).catch(() => null);
}

export function startPane(): void {
  const app = document.getElementById("app")!;
  const mode = document.getElementById("mode")!;
  void officeReady().then((info) => {
    const inExcel = !!info && info.host === "Excel" && typeof (globalThis as { Excel?: unknown }).Excel !== "undefined";
    document.body.dataset.mode = inExcel ? "excel" : "preview";
    mode.textContent = inExcel ? "connected to the workbook" : "preview";
    if (inExcel) startExcel(app);
    else startPreview(app);
  });
}
