/**
 * The task pane in a real browser: Debian's chromium driven by playwright-core, serving the
 * production build in dist/. Screenshots go to test-artifacts/ (not committed).
 * Skips with a notice when /usr/bin/chromium is absent (.ci/run installs it).
 */
import { existsSync, mkdirSync, readFileSync } from "node:fs";
import { resolve } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { serveDist } from "./server";
import { KERNELS_WASM_BASE64 } from "../../src/core/kernels.wasm";

const CHROMIUM = "/usr/bin/chromium";
const have = existsSync(CHROMIUM);
if (!have) console.log(`NOTICE: ${CHROMIUM} not found; skipping the browser tests (apt-get install chromium).`);
const ART = resolve(__dirname, "../../test-artifacts");
const OFFICE_JS = "https://appsforoffice.microsoft.com/**";

let browser: Browser;
let server: { url: string; close: () => Promise<void> };

beforeAll(async () => {
  if (!have) return;
  mkdirSync(ART, { recursive: true });
  server = await serveDist();
  const { chromium } = await import("playwright-core");
  process.env.HOME = resolve(ART, "chromium-home");
  browser = await chromium.launch({
    executablePath: CHROMIUM,
    args: ["--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"],
  });
});
afterAll(async () => {
  await browser?.close();
  await server?.close();
});

async function openPreview(width = 380): Promise<{ page: Page; errors: string[]; dialogs: string[] }> {
  const ctx = await browser.newContext({ viewport: { width, height: 900 } });
  const page = await ctx.newPage();
  const errors: string[] = [];
  const dialogs: string[] = [];
  page.on("pageerror", (e) => errors.push(e.message));
  page.on("dialog", (d) => {
    dialogs.push(d.message());
    void d.dismiss();
  });
  await page.route(OFFICE_JS, (r) => r.abort()); // offline: office.js cannot load
  await page.goto(`${server.url}/taskpane.html`);
  await expect.poll(() => page.textContent("#mode"), { timeout: 10_000 }).toBe("preview");
  return { page, errors, dialogs };
}

describe.skipIf(!have)("preview in a plain browser (office.js unavailable)", () => {
  it("explains the dependent-columns example, naming both columns and the relation", async () => {
    const { page, errors } = await openPreview();
    await page.getByLabel("Example").selectOption("dependent");
    const dep = page.locator('[data-finding="dependent-columns"]');
    await dep.waitFor();
    const text = (await dep.textContent()) ?? "";
    expect(text).toContain("Temp °F = 32 + 1.8 × Temp °C");
    expect(text).toContain("The coefficient of Temp °F shows #N/A");
    expect(await page.locator("table tbody tr").count()).toBe(4);
    // one plotted point per used row (12 rows, none skipped)
    expect(await page.locator("svg.residual-plot circle.pt").count()).toBe(12);
    await page.screenshot({ path: resolve(ART, "preview-dependent.png"), fullPage: true });
    expect(errors).toEqual([]);
    await page.context().close();
  });

  it("plots one point per used row when rows are skipped", async () => {
    const { page } = await openPreview();
    await page.getByLabel("Example").selectOption("gaps");
    await page.locator('[data-finding="skipped-rows"]').waitFor();
    expect(await page.locator("svg.residual-plot circle.pt").count()).toBe(8);
    const skipped = (await page.locator('[data-finding="skipped-rows"]').textContent()) ?? "";
    expect(skipped).toContain("3 rows were skipped");
    expect(skipped).toContain("rainfall (mm) is empty (row 5)");
    await page.context().close();
  });

  it("shows pasted markup as text and runs no script from it", async () => {
    const { page, errors, dialogs } = await openPreview();
    const evil = "<img src=x onerror=alert(1)>";
    const data = [`y\t${evil}\tplain`, "1\t1\t2", "2.1\t2\t1", "2.9\t3\t5", "4.2\t4\t3", "5.1\t5\t4", "5.8\t6\t1"].join("\n");
    await page.getByRole("textbox", { name: /^Data \(/ }).fill(data);
    await page.getByRole("button", { name: "Fit" }).click();
    await page.locator("table tbody tr").first().waitFor();
    const cell = page.locator("table tbody th", { hasText: evil });
    expect(await cell.count()).toBe(1);
    expect(await page.locator("#output img").count()).toBe(0);
    await page.waitForTimeout(300);
    expect(dialogs).toEqual([]);
    expect(errors).toEqual([]);
    await page.screenshot({ path: resolve(ART, "preview-markup-as-text.png"), fullPage: true });
    await page.context().close();
  });

  it("is usable at 320 px and every control is labelled", async () => {
    const { page } = await openPreview(320);
    await page.getByLabel("Example").selectOption("cure");
    await page.locator(".findings").waitFor();
    const overflow = await page.evaluate(() => document.documentElement.scrollWidth);
    expect(overflow).toBeLessThanOrEqual(320);
    const unlabelled = await page.evaluate(() => [...document.querySelectorAll("input, select, textarea")].filter((e) => (e as HTMLInputElement).labels?.length === 0).length);
    expect(unlabelled).toBe(0);
    // keyboard: Tab reaches the example picker first
    await page.keyboard.press("Tab");
    expect(await page.evaluate(() => document.activeElement?.tagName)).toBe("SELECT");
    await page.screenshot({ path: resolve(ART, "preview-320px.png"), fullPage: true });
    await page.context().close();
  });

  it("lets the page compile the engine's WebAssembly kernels under its security policy", async () => {
    const { page, errors } = await openPreview();
    const compiled = await page.evaluate(async (b64: string) => {
      const bytes = Uint8Array.from(atob(b64), (c) => c.charCodeAt(0));
      const mod = await WebAssembly.compile(bytes);
      return WebAssembly.Module.exports(mod).map((e) => e.name);
    }, KERNELS_WASM_BASE64);
    expect(compiled).toEqual(expect.arrayContaining(["fused", "group", "gram", "dot2", "axpy2", "lev"]));
    expect(errors).toEqual([]);
    await page.context().close();
  });

  it("has a Content-Security-Policy that allows scripts only from the page and office.js origins (plus compiling the WebAssembly kernels)", async () => {
    const html = readFileSync(resolve(__dirname, "../../dist/taskpane.html"), "utf8");
    const csp = /Content-Security-Policy"?\s+content="([^"]+)"/.exec(html)?.[1] ?? "";
    expect(csp).toMatch(/script-src 'self' 'wasm-unsafe-eval' https:\/\/appsforoffice\.microsoft\.com;/);
    expect(csp).not.toMatch(/'unsafe-inline'|'unsafe-eval'/);
  });
});

describe.skipIf(!have)("in the spreadsheet (stand-in for the Excel API)", () => {
  it("follows the selection to an LSQ formula and explains its fit with header labels", async () => {
    const ctx = await browser.newContext({ viewport: { width: 380, height: 900 } });
    const page = await ctx.newPage();
    const errors: string[] = [];
    page.on("pageerror", (e) => errors.push(e.message));
    const standin = readFileSync(resolve(__dirname, "excel-standin.js"), "utf8");
    await page.route(OFFICE_JS, (r) => r.fulfill({ contentType: "text/javascript", body: standin }));
    await page.goto(`${server.url}/taskpane.html`);
    await expect.poll(() => page.textContent("#mode"), { timeout: 10_000 }).toBe("connected to the workbook");
    // The host calls LSQ.COEF in F2 (the functions record the call for the pane).
    await page.evaluate(() => {
      const w = window as unknown as { __fns: Record<string, (...a: unknown[]) => unknown>; __excel: { headers: Record<string, unknown>; spill: Record<string, string> } };
      const c = [18.5, 19, 19.5, 20, 20.5, 21, 21.5, 22, 22.5, 23, 23.5, 24];
      const h = [41, 38, 45, 50, 47, 52, 44, 58, 55, 49, 61, 57];
      const d = [1.12, 1.31, 1.42, 1.66, 1.74, 1.95, 2.01, 2.32, 2.38, 2.49, 2.81, 2.86];
      const y = d.map((v) => [v]);
      const x = c.map((v, i) => [v, h[i], Math.round((32 + 1.8 * v) * 100) / 100]);
      w.__excel.headers["Sheet1!B2:D13"] = [["Temp °C", "humidity (%)", "Temp °F"]];
      w.__excel.spill["Sheet1!F3"] = "Sheet1!F2";
      w.__fns.COEF!(y, x, null, null, null, { address: "Sheet1!F2", parameterAddresses: ["Sheet1!A2:A13", "Sheet1!B2:D13", "", "", ""] });
    });
    await page.evaluate(() => (window as unknown as { __select: (a: string) => Promise<void> }).__select("Sheet1!F3"));
    const dep = page.locator('[data-finding="dependent-columns"]');
    await dep.waitFor();
    expect(await dep.textContent()).toContain("Temp °F = 32 + 1.8 × Temp °C");
    expect(await page.textContent("#status")).toBe("LSQ.COEF in Sheet1!F2");
    await page.screenshot({ path: resolve(ART, "excel-selection.png"), fullPage: true });
    // A cell without an LSQ formula: the pane says so.
    await page.evaluate(() => (window as unknown as { __select: (a: string) => Promise<void> }).__select("Sheet1!K9"));
    await expect.poll(() => page.textContent("#status")).toContain("does not hold an LSQ formula");
    // An LSQ formula not calculated in this session (e.g. a workbook just opened): the pane says how to get it explained.
    await page.evaluate(() => {
      const w = window as unknown as { __excel: { formulas: Record<string, string> }; __select: (a: string) => Promise<void> };
      w.__excel.formulas["Sheet1!H2"] = "=LSQ.PARAMS(A2:A13,B2:D13)";
      return w.__select("Sheet1!H2");
    });
    await expect.poll(() => page.textContent("#status")).toContain("holds LSQ.PARAMS, but it has not been calculated");
    // Insert example: a new sheet with data and one formula for each LSQ function.
    await page.getByRole("button", { name: "Insert example" }).click();
    await expect
      .poll(async () => page.evaluate(() => (window as unknown as { __excel: { written: { formulas?: string[][] }[] } }).__excel.written.filter((w) => w.formulas).map((w) => /^=LSQ\.(\w+)\(/.exec(w.formulas![0]![0]!)?.[1]).sort()))
      .toEqual(["CHECK", "COEF", "COV", "FITTED", "INFLUENCE", "PARAMS", "PREDICT", "RESID", "STATS"]);
    expect(errors).toEqual([]);
    await ctx.close();
  });
});
