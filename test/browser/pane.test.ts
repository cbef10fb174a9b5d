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
    expect(await page.locator("figure.residual-plot circle.pt").count()).toBe(12);
    await page.screenshot({ path: resolve(ART, "preview-dependent.png"), fullPage: true });
    expect(errors).toEqual([]);
    await page.context().close();
  });

  it("plots one point per used row when rows are skipped", async () => {
    const { page } = await openPreview();
    await page.getByLabel("Example").selectOption("gaps");
    await page.locator('[data-finding="skipped-rows"]').waitFor();
    expect(await page.locator("figure.residual-plot circle.pt").count()).toBe(8);
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
    // scripts stay strict; inline styles are allowed because office.js injects them (DEVELOPERS.md "Host requirements")
    const scriptSrc = /script-src ([^;]+)/.exec(csp)![1]!;
    expect(scriptSrc).not.toMatch(/'unsafe-inline'|'unsafe-eval'/);
    expect(csp).toMatch(/style-src 'self' 'unsafe-inline'/);
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
      w.__fns.COEF!(y, x, null, null, null, null, null, { address: "Sheet1!F2", parameterAddresses: ["Sheet1!A2:A13", "Sheet1!B2:D13", "", "", "", "", ""] });
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

/** Bounding box of the first element matching `sel`. */
async function box(page: Page, sel: string): Promise<{ x: number; y: number; width: number; height: number }> {
  const b = await page.locator(sel).first().boundingBox();
  if (!b) throw new Error(`${sel} is not visible`);
  return b;
}

describe.skipIf(!have)("the preview at every width (320, 800 and 1,400 px)", () => {
  for (const width of [320, 800, 1400])
    it(`${width} px: no sideways scrolling, plots at most 560 px wide, labels next to their values, limits visible or a scroll cue`, async () => {
      const { page, errors } = await openPreview(width);
      await page.getByLabel("Example").selectOption("thermocouple");
      await page.locator("figure.residual-plot svg").waitFor();
      expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(width);
      for (const sel of ["figure.residual-plot svg", "figure.curve-plot svg"]) {
        const b = await box(page, sel);
        expect(b.width, sel).toBeLessThanOrEqual(560);
        expect(b.height, sel).toBeLessThanOrEqual(360);
      }
      // each summary value sits within 460 px of its label's start
      const gaps = await page.evaluate(() =>
        [...document.querySelectorAll("dl.summary .pair")].map((p) => {
          const dt = p.querySelector("dt")!.getBoundingClientRect();
          const dd = p.querySelector("dd")!.getBoundingClientRect();
          return dd.right - dt.left;
        }),
      );
      expect(Math.max(...gaps)).toBeLessThanOrEqual(460);
      // the coefficient table's last column (upper limit) is visible, or the scroll cue says there is more
      const limitsVisible = await page.evaluate(() => {
        const wrap = document.querySelector(".coefs .table-wrap")!;
        const last = wrap.querySelector("thead th:last-child")!.getBoundingClientRect();
        return last.right <= wrap.getBoundingClientRect().right + 1;
      });
      const cue = await page.locator(".coefs .scroll-cue").isVisible();
      expect(limitsVisible || cue).toBe(true);
      if (width >= 1400) {
        // two columns: the plots sit beside the findings, not under them
        const main = await box(page, ".layout .col.main");
        const side = await box(page, ".layout .col.side");
        expect(side.x).toBeGreaterThan(main.x + main.width - 1);
        expect(side.y).toBeLessThan(main.y + 50);
      }
      await page.screenshot({ path: resolve(ART, `preview-${width}px.png`), fullPage: true });
      expect(errors).toEqual([]);
      await page.context().close();
    });
});

describe.skipIf(!have)("plots people can read", () => {
  it("residual plot: axes with tick numbers, the caption outside the drawing, points that name their row on focus", async () => {
    const { page } = await openPreview(800);
    await page.getByLabel("Example").selectOption("weighted");
    const fig = page.locator("figure.residual-plot");
    await fig.locator("svg").waitFor();
    expect(await fig.locator("svg text.tick").count()).toBeGreaterThanOrEqual(6);
    expect(await fig.locator("svg text.axis-title").allTextContents()).toEqual(["fitted value", "residual"]);
    expect(await fig.locator("figcaption").count()).toBe(1);
    expect(await fig.locator("svg figcaption, svg text.caption").count()).toBe(0);
    // the caption lies below every point
    const cap = await box(page, "figure.residual-plot figcaption");
    const svgBox = await box(page, "figure.residual-plot svg");
    expect(cap.y).toBeGreaterThanOrEqual(svgBox.y + svgBox.height - 1);
    // keyboard: focusing a point names its row
    await fig.locator("circle.pt").first().focus();
    await expect.poll(() => fig.locator(".plot-status").textContent()).toMatch(/^row \d+: fitted/);
    await page.context().close();
  });

  it("fitted-curve plot for one x: data, curve, confidence and prediction bands", async () => {
    const { page } = await openPreview(800);
    await page.getByLabel("Example").selectOption("cure");
    const fig = page.locator("figure.curve-plot");
    await fig.locator("svg").waitFor();
    expect(await fig.locator("path.curve").count()).toBe(1);
    expect(await fig.locator("path.band.confidence").count()).toBe(1);
    expect(await fig.locator("path.band.prediction").count()).toBe(1);
    expect(await fig.locator("circle.pt").count()).toBe(12);
    await page.screenshot({ path: resolve(ART, "preview-curve.png"), fullPage: true });
    await page.context().close();
  });

  it("10,000 points stay readable (shown as density), and an exact fit says so instead of plotting", async () => {
    const { page } = await openPreview(800);
    const lines = ["y\tx"];
    for (let i = 0; i < 10000; i++) lines.push(`${(2 + 0.5 * (i / 100) + Math.sin(i * 12.9898) * 0.3).toFixed(5)}\t${(i / 100).toFixed(2)}`);
    // pasted in one piece (as a paste is one event); typing 10,000 lines is not what users do
    await page.evaluate((text) => {
      const t = document.querySelector("textarea")!;
      t.value = text;
      t.dispatchEvent(new Event("change"));
    }, lines.join("\n"));
    await page.getByRole("button", { name: "Fit" }).click();
    const fig = page.locator("figure.residual-plot");
    await fig.locator("svg").waitFor();
    expect(await fig.locator("rect.density").count()).toBeGreaterThan(50);
    expect(await fig.locator("circle").count()).toBe(0);
    await page.screenshot({ path: resolve(ART, "preview-10000-points.png"), fullPage: true });
    await page.getByRole("textbox", { name: /^Data \(/ }).fill(["y\tx", "1\t0", "3\t1", "5\t2", "7\t3", "9\t4"].join("\n"));
    await page.getByRole("button", { name: "Fit" }).click();
    await expect.poll(() => page.locator("figure.residual-plot .plot-empty").textContent()).toContain("The fit is exact");
    expect(await page.locator("figure.residual-plot svg").count()).toBe(0);
    await page.context().close();
  });
});

describe.skipIf(!have)("pasted data", () => {
  it("a first row of numbers is data: the columns are named y, x1, … and the pane says so", async () => {
    const { page } = await openPreview(800);
    await page.getByRole("textbox", { name: /^Data \(/ }).fill(["1.1\t1\t5", "2.0\t2\t3", "3.2\t3\t4", "3.9\t4\t1", "5.1\t5\t2"].join("\n"));
    await page.getByRole("button", { name: "Fit" }).click();
    await page.locator(".coefs table").waitFor();
    expect(await page.locator(".parse-notes").textContent()).toContain("The first row holds numbers, so it was read as data");
    expect(await page.locator(".coefs tbody th").allTextContents()).toEqual(["intercept", "x1", "x2"]);
    expect(await page.locator('[data-finding="skipped-rows"]').count()).toBe(0);
    await page.context().close();
  });
  it("semicolons between cells and decimal commas are read as numbers, and the pane says so", async () => {
    const { page } = await openPreview(800);
    await page.getByRole("textbox", { name: /^Data \(/ }).fill(["y;x", "1,1;2,3", "2,0;3,1", "3,2;4,4", "3,9;5,2", "5,1;6,6"].join("\n"));
    await page.getByRole("button", { name: "Fit" }).click();
    await page.locator(".coefs table").waitFor();
    expect(await page.locator(".parse-notes").textContent()).toContain("decimal comma");
    expect(await page.locator('[data-finding="skipped-rows"]').count()).toBe(0);
    await page.context().close();
  });
  it("shows each example's description, and long titles stay within the page", async () => {
    const { page } = await openPreview(320);
    await page.getByLabel("Example").selectOption("photometer");
    await expect.poll(() => page.locator("#example-desc").textContent()).toContain("bench photometer");
    const sel = await box(page, "select");
    expect(sel.x + sel.width).toBeLessThanOrEqual(320);
    // the calibration example reads its two unknown samples back
    await page.locator(".inverse table").waitFor();
    expect(await page.locator(".inverse tbody tr").count()).toBe(2);
    expect(await page.locator("figure.curve-plot line.reading").count()).toBe(4);
    await page.screenshot({ path: resolve(ART, "preview-calibration-320px.png"), fullPage: true });
    await page.context().close();
  });
});

describe.skipIf(!have)("start-up on a slow day", () => {
  it("office.js stalled for 8 s: the preview appears within 1 s", async () => {
    const ctx = await browser.newContext({ viewport: { width: 800, height: 900 } });
    const page = await ctx.newPage();
    await page.route(OFFICE_JS, async (r) => {
      await new Promise((res) => setTimeout(res, 8000));
      await r.abort().catch(() => undefined);
    });
    const t0 = Date.now();
    await page.goto(`${server.url}/taskpane.html`, { waitUntil: "commit" });
    await expect.poll(() => page.textContent("#mode"), { timeout: 3000, interval: 50 }).toBe("preview");
    const ms = Date.now() - t0;
    console.log(`preview shown after ${ms} ms with office.js stalled`);
    expect(ms).toBeLessThan(1000);
    await ctx.close();
  }, 30_000);
  it("office.js arriving after 5 s inside Excel: the pane switches to the spreadsheet mode and the functions are associated", async () => {
    const ctx = await browser.newContext({ viewport: { width: 800, height: 900 } });
    const page = await ctx.newPage();
    const standin = readFileSync(resolve(__dirname, "excel-standin.js"), "utf8");
    await page.route(OFFICE_JS, async (r) => {
      await new Promise((res) => setTimeout(res, 5000));
      await r.fulfill({ contentType: "text/javascript", body: standin });
    });
    await page.goto(`${server.url}/taskpane.html`, { waitUntil: "domcontentloaded" });
    await expect.poll(() => page.textContent("#mode"), { timeout: 3000 }).toBe("preview");
    await expect.poll(() => page.textContent("#mode"), { timeout: 15_000 }).toBe("connected to the workbook");
    const ids = await page.evaluate(() => Object.keys((window as unknown as { __fns: Record<string, unknown> }).__fns).sort());
    expect(ids).toEqual(["CHECK", "COEF", "COV", "FITTED", "GOF", "INFLUENCE", "INVERSE", "LIMITS", "LINEXY", "PARAMS", "PREDICT", "RESID", "STATS"]);
    await ctx.close();
  }, 30_000);
});

describe.skipIf(!have)("the spreadsheet mode: calibration views, errors that look like errors, clicking a point", () => {
  it("INVERSE shows the readings read back; a bad argument shows as an error; a clicked point selects its worksheet row", async () => {
    const ctx = await browser.newContext({ viewport: { width: 900, height: 900 } });
    const page = await ctx.newPage();
    const errors: string[] = [];
    page.on("pageerror", (e) => errors.push(e.message));
    const standin = readFileSync(resolve(__dirname, "excel-standin.js"), "utf8");
    await page.route(OFFICE_JS, (r) => r.fulfill({ contentType: "text/javascript", body: standin }));
    await page.goto(`${server.url}/taskpane.html`);
    await expect.poll(() => page.textContent("#mode"), { timeout: 10_000 }).toBe("connected to the workbook");
    // x holds zeros, so with cell addresses the functions first ask the workbook whether those
    // cells are empty (functions/blanks.ts) and answer with a promise; a rejected one is the error
    // value the cell shows.
    await page.evaluate(async () => {
      const w = window as unknown as { __fns: Record<string, (...a: unknown[]) => unknown>; __excel: { headers: Record<string, unknown> } };
      const x = [0, 0, 1, 1, 2, 2, 4, 4, 6, 6, 8, 8, 10, 10].map((v) => [v]);
      const y = [0.006, 0.002, 0.114, 0.111, 0.215, 0.219, 0.41, 0.406, 0.589, 0.594, 0.756, 0.751, 0.897, 0.902].map((v) => [v]);
      w.__excel.headers["Cal!B2:B15"] = [["dye (mg/L)"]];
      const inv = { address: "Cal!F2", parameterAddresses: ["Cal!D2:D3", "Cal!A2:A15", "Cal!B2:B15", "", "", "", "", "", "", "", ""] };
      await w.__fns.INVERSE!([[0.342], [0.688]], y, x, null, true, 2, null, null, null, true, null, inv);
      // the cell shows #VALUE!: a degree of 0 is not allowed (not recorded: it did not pass validation)
      const bad = await Promise.resolve()
        .then(() => w.__fns.COEF!(y, x, null, null, 0, null, null, { address: "Cal!K2", parameterAddresses: ["Cal!A2:A15", "Cal!B2:B15", "", "", "", "", ""] }))
        .then(
          () => "a result",
          (e: unknown) => (e as { code?: string }).code ?? String(e),
        );
      if (bad !== "#VALUE!") throw new Error(`COEF with degree 0 gave ${bad}`);
    });
    await page.evaluate(() => (window as unknown as { __select: (a: string) => Promise<void> }).__select("Cal!F2"));
    await page.locator(".inverse table").waitFor();
    expect(await page.locator(".inverse tbody tr").count()).toBe(2);
    expect(await page.textContent("#status")).toBe("LSQ.INVERSE in Cal!F2");
    // clicking a plotted point selects its worksheet row, and the explanation stays
    await page.locator("figure.curve-plot circle.pt").first().dispatchEvent("click");
    await expect.poll(() => page.evaluate(() => (window as unknown as { __excel: { selected: string[] } }).__excel.selected)).toEqual(["Cal!2:2"]);
    expect(await page.locator(".inverse table").count()).toBe(1);
    await page.screenshot({ path: resolve(ART, "excel-inverse.png"), fullPage: true });
    // a formula whose arguments cannot be fitted: the reason shows as an error (role alert, error styling)
    await page.evaluate(() => {
      const w = window as unknown as { __fns: Record<string, (...a: unknown[]) => unknown> };
      try {
        w.__fns.INVERSE!([[0.5]], [[1], [2], [3]], [[1], [2], [3]], null, true, 5, null, null, null, null, null, { address: "Cal!F9", parameterAddresses: [] });
      } catch {
        // #N/A in the cell: 3 rows for 6 parameters
      }
    });
    await page.waitForTimeout(1600);
    await page.evaluate(() => (window as unknown as { __select: (a: string) => Promise<void> }).__select("Cal!F9"));
    const problem = page.locator("#problem");
    await expect.poll(() => problem.isVisible()).toBe(true);
    expect(await problem.textContent()).toMatch(/LSQ\.INVERSE in Cal!F9 shows #N\/A: only 3 usable rows for 6 parameters/);
    expect(await problem.getAttribute("role")).toBe("alert");
    const color = await problem.evaluate((e) => getComputedStyle(e).color);
    expect(color).toBe("rgb(161, 42, 30)");
    expect(errors).toEqual([]);
    await ctx.close();
  }, 60_000);
});

describe.skipIf(!have)("the help page", () => {
  it("renders tables as tables and has every #lsq… anchor the functions link to", async () => {
    const ctx = await browser.newContext({ viewport: { width: 1000, height: 900 } });
    const page = await ctx.newPage();
    await page.goto(`${server.url}/help.html`);
    expect(await page.locator("table").count()).toBeGreaterThanOrEqual(4);
    expect(await page.locator("text=| argument |").count()).toBe(0);
    const meta = JSON.parse(readFileSync(resolve(__dirname, "../../dist/functions.json"), "utf8")) as { functions: { id: string; helpUrl: string }[] };
    for (const f of meta.functions) {
      const anchor = f.helpUrl.split("#")[1]!;
      expect(await page.locator(`[id="${anchor}"]`).count(), anchor).toBe(1);
    }
    // the STATS rows are a list, not one run-on paragraph
    expect(await page.locator("#lsqstats ~ ol li").count()).toBeGreaterThanOrEqual(15);
    await page.screenshot({ path: resolve(ART, "help.png"), fullPage: false });
    await ctx.close();
  });
});
