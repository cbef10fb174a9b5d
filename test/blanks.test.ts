/**
 * Empty cells passed as 0 (office-js issues #4702, #5262): through the built bundle with a
 * stand-in for the Excel API that reports which cells of a range are empty, a zero that is really
 * an empty cell is skipped like any missing value, and the answer is cached; where the host cannot
 * answer, CHECK says which rows may hold empty cells. The added time is measured (not asserted)
 * at 10,000 × 10 with no zeros and with 1 % zeros (README "Missing data").
 */
import { describe, expect, it } from "vitest";
import { HostError, loadHost } from "./helpers/host";

/** A stand-in Excel API: `valueTypes` of each known range, counting the calls. */
function excelStandIn(types: Record<string, string[][]>): { Excel: unknown; calls: () => number } {
  let n = 0;
  const Excel = {
    async run<T>(f: (ctx: unknown) => Promise<T>): Promise<T> {
      n++;
      const ctx = {
        workbook: {
          worksheets: {
            getItem: (sheet: string) => ({
              getRange: (local: string) => ({
                load() {},
                get valueTypes() {
                  const t = types[`${sheet}!${local}`];
                  if (!t) throw new Error("unknown range");
                  return t;
                },
              }),
            }),
          },
        },
        sync: async () => undefined,
      };
      return f(ctx);
    },
  };
  return { Excel, calls: () => n };
}

const yv = [1.0, 2.1, 0, 3.9, 5.2, 6.0, 6.9, 8.1]; // row 3 is an empty cell the host passed as 0
const xv = [1, 2, 3, 4, 5, 6, 7, 8];
const y = yv.map((v) => [v]);
const x = xv.map((v) => [v]);
const ADDR = { y: "Lab!B2:B9", x: "Lab!A2:A9" };

describe("an empty cell passed as 0 is not fitted as a zero", () => {
  it("with the Excel API: the row is skipped (y is empty), and the answer is cached", async () => {
    const types = { "Lab!B2:B9": yv.map((_v, i) => [i === 2 ? "Empty" : "Double"]), "Lab!A2:A9": xv.map(() => ["Double"]) };
    const ex = excelStandIn(types);
    const host = loadHost({ Excel: ex.Excel });
    const stats = (await host.call("STATS", { y, x }, "Lab!D2", ADDR)) as unknown[][];
    expect(stats[1]).toEqual(["observations skipped", 1]);
    const fitted = (await host.call("FITTED", { y, x }, "Lab!E2", ADDR)) as unknown[][];
    expect((fitted[2]![0] as HostError).message).toBe("row 3 was skipped: y is empty");
    expect(ex.calls()).toBe(1); // y asked once (x has no zeros), then cached
    // the same numbers without the empty cell: the same coefficients
    const direct = host.call("COEF", { y: y.filter((_r, i) => i !== 2), x: x.filter((_r, i) => i !== 2) });
    expect(await host.call("COEF", { y, x }, "Lab!F2", ADDR)).toEqual(direct);
    // a real zero (the cell holds 0) stays a zero
    const types2 = { "Lab!B2:B9": yv.map(() => ["Double"]), "Lab!A2:A9": xv.map(() => ["Double"]) };
    const host2 = loadHost({ Excel: excelStandIn(types2).Excel });
    const s2 = (await host2.call("STATS", { y, x }, "Lab!D2", ADDR)) as unknown[][];
    expect(s2[1]).toEqual(["observations skipped", 0]);
  });

  it("without an answer from the host, CHECK says which rows may hold empty cells and how to mark them", async () => {
    const host = loadHost(); // no Excel API
    const check = ((await host.call("CHECK", { y, x }, "Lab!G2", ADDR)) as string[][]).map((r) => r[0]!);
    const line = check.find((t) => t.includes("may be an empty cell"));
    expect(line).toBeDefined();
    expect(line).toContain("1 row holds a zero in y that may be an empty cell");
    expect(line).toContain("(row 3)");
    expect(line).toContain("=NA()");
  });

  it("the caller's arrays are never changed", async () => {
    const types = { "Lab!B2:B9": yv.map((_v, i) => [i === 2 ? "Empty" : "Double"]), "Lab!A2:A9": xv.map(() => ["Double"]) };
    const host = loadHost({ Excel: excelStandIn(types).Excel });
    const before = JSON.stringify([y, x]);
    await host.call("PARAMS", { y, x }, "Lab!H2", ADDR);
    expect(JSON.stringify([y, x])).toBe(before);
  });

  it("reports the added time at 10,000 × 10 with no zeros and with 1 % zeros (measured, not asserted)", async () => {
    const m = 10_000;
    const k = 10;
    const make = (zeros: boolean) => {
      const xs = Array.from({ length: m }, (_, i) => Array.from({ length: k }, (_, j) => (zeros && (i * k + j) % 100 === 7 ? 0 : Math.sin(i * 0.37 + j) + j)));
      const ys = xs.map((r, i) => [r.reduce((s, v) => s + v, 0) + Math.cos(i)]);
      return { y: ys, x: xs };
    };
    const addr = { y: "Big!A2:A10001", x: "Big!B2:K10001" };
    const time = async (host: ReturnType<typeof loadHost>, d: { y: unknown[][]; x: unknown[][] }, withAddr: boolean, reps = 9): Promise<number> => {
      const ts: number[] = [];
      for (let r = 0; r < reps; r++) {
        const t0 = performance.now();
        await host.call("STATS", d, `Big!M${r}`, withAddr ? addr : {});
        ts.push(performance.now() - t0);
      }
      return ts.sort((a, b) => a - b)[reps >> 1]!;
    };
    const clean = make(false);
    const zeros = make(true);
    const typesZ = { [addr.y]: clean.y.map(() => ["Double"]), [addr.x]: zeros.x.map((r, i) => r.map((_v, j) => ((i * k + j) % 100 === 7 && i % 2 === 0 ? "Empty" : "Double"))) };
    const h1 = loadHost({ Excel: excelStandIn(typesZ).Excel });
    await h1.call("STATS", clean); // warm the fit cache and the code
    const base = await time(h1, clean, false);
    const noZeros = await time(h1, clean, true);
    const h2 = loadHost({ Excel: excelStandIn(typesZ).Excel });
    const first = performance.now();
    await h2.call("STATS", zeros, "Big!N1", addr);
    const firstMs = performance.now() - first;
    const withZeros = await time(h2, zeros, true);
    console.log(`blank check at 10,000 × 10 (a cached fit, STATS): no zeros ${base.toFixed(2)} → ${noZeros.toFixed(2)} ms; 1 % zeros: first call ${firstMs.toFixed(1)} ms, later calls ${withZeros.toFixed(2)} ms`);
    expect(noZeros).toBeGreaterThan(0);
  });
});
