/** The pane's record of LSQ calls by address: lookup rules and its byte bound (common practice: LRU). */
import { describe, expect, it } from "vitest";
import { lookup, recordCall, registryStats, SMALL_CELLS } from "../src/functions/registry";

describe("formula registry", () => {
  it("finds a call by address regardless of $ signs, quotes and case", () => {
    recordCall("COEF", "'Lab data'!$F$2", [], { y: [[1]], x: [[2]] }, null);
    expect(lookup("'lab data'!F2")?.fn).toBe("COEF");
    expect(lookup("Lab data!$F$2")?.fn).toBe("COEF");
    expect(lookup("Sheet1!F2")).toBeUndefined();
  });
  it("keeps the latest call per address and drops the oldest beyond its bound", () => {
    for (let i = 0; i < 2100; i++) recordCall("STATS", `S!A${i}`, [], {}, null);
    expect(lookup("S!A0")).toBeUndefined();
    expect(lookup("S!A2099")?.fn).toBe("STATS");
    recordCall("CHECK", "S!A2099", [], {}, null);
    expect(lookup("S!A2099")?.fn).toBe("CHECK");
  });
  it("keeps small ranges, but only the address of a large one (never its cells)", () => {
    const small = Array.from({ length: SMALL_CELLS }, (_, i) => [i]);
    const big = Array.from({ length: 100_000 }, (_, i) => [i, i + 1]);
    recordCall("COEF", "B!A1", ["B!C1:C256", "B!D1:E100000"], { y: small, x: big }, null);
    const rec = lookup("B!A1")!;
    expect(rec.args.y).toBe(small);
    expect(rec.args.x).toBeNull();
    expect(rec.dropped).toEqual(["x"]);
    expect(registryStats().bytes).toBeLessThan(registryStats().budget);
  });
  it("holds the fit only weakly", () => {
    const fit = { fit: 1 };
    recordCall("COEF", "W!A1", [], {}, fit);
    expect(lookup("W!A1")!.ref!.deref()).toBe(fit);
  });
  it("stays within its byte budget however many distinct small calls it sees", () => {
    const y = Array.from({ length: SMALL_CELLS }, (_, i) => [i + 0.5]);
    for (let i = 0; i < 5000; i++) recordCall("PARAMS", `M!B${i}`, ["M!A1:A256"], { y, x: y, level: 0.9 }, null);
    const s = registryStats();
    expect(s.bytes).toBeLessThanOrEqual(s.budget);
    expect(lookup("M!B4999")).toBeDefined();
  });
});
