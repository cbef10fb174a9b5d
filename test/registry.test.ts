/** The pane's record of LSQ calls by address: lookup rules and bounds (common practice: LRU). */
import { describe, expect, it } from "vitest";
import { lookup, recordCall } from "../src/functions/registry";

describe("formula registry", () => {
  it("finds a call by address regardless of $ signs, quotes and case", () => {
    recordCall({ fn: "COEF", address: "'Lab data'!$F$2", parameterAddresses: [], args: [[[1]], [[2]]], at: 0 });
    expect(lookup("'lab data'!F2")?.fn).toBe("COEF");
    expect(lookup("Lab data!$F$2")?.fn).toBe("COEF");
    expect(lookup("Sheet1!F2")).toBeUndefined();
  });
  it("keeps the latest call per address and drops the oldest beyond its bound", () => {
    for (let i = 0; i < 600; i++) recordCall({ fn: "STATS", address: `S!A${i}`, parameterAddresses: [], args: [], at: i });
    expect(lookup("S!A0")).toBeUndefined();
    expect(lookup("S!A599")?.fn).toBe("STATS");
    recordCall({ fn: "CHECK", address: "S!A599", parameterAddresses: [], args: [], at: 1 });
    expect(lookup("S!A599")?.fn).toBe("CHECK");
  });
  it("drops old records when their arguments hold too many cells", () => {
    const big = Array.from({ length: 1000 }, () => Array.from({ length: 10_000 }, () => 1)); // 10 M cells
    recordCall({ fn: "COEF", address: "B!A1", parameterAddresses: [], args: [big], at: 0 });
    recordCall({ fn: "COEF", address: "B!A2", parameterAddresses: [], args: [big], at: 0 });
    recordCall({ fn: "COEF", address: "B!A3", parameterAddresses: [], args: [big], at: 0 });
    expect(lookup("B!A1")).toBeUndefined();
    expect(lookup("B!A3")).toBeDefined();
  });
});
