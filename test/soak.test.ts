/**
 * The day-long runtime, in small (scripts/soak.mjs --quick; the full run is `npm run soak`, also
 * run by .ci/run): retained memory per store against its accounting and within the budget, the
 * registry's bound, a day of distinct calls and a burst that must not refit, hostile arguments
 * that each answer with one error value, and a normal call afterwards that is right. The script
 * measures with --expose-gc in processes of its own; this test runs it and reads its report.
 */
import { spawnSync } from "node:child_process";
import { resolve } from "node:path";
import { describe, expect, it } from "vitest";

describe("load test (scripts/soak.mjs --quick)", () => {
  it("memory within budget and accounted within 25 %, no refit in a burst, nothing escapes", () => {
    const r = spawnSync(process.execPath, ["--expose-gc", resolve(__dirname, "../scripts/soak.mjs"), "--quick", "--json"], { encoding: "utf8", maxBuffer: 1 << 26 });
    const lines = r.stdout.trim().split("\n");
    const report = JSON.parse(lines[lines.length - 1]!) as { failures: string[]; memory: { shape: string; ratio: number }[]; burst: { fitsComputed: number }; hostile: unknown[] };
    console.log(lines.filter((l) => !l.startsWith("ok   hostile") && !l.startsWith("{")).join("\n"));
    expect(report.failures, report.failures.join("; ")).toEqual([]);
    expect(report.memory.length).toBe(3);
    for (const m of report.memory) expect(Math.abs(m.ratio - 1), m.shape).toBeLessThanOrEqual(0.25);
    expect(report.burst.fitsComputed).toBeLessThanOrEqual(50);
    expect(report.hostile.length).toBe(40);
    expect(r.status).toBe(0);
  }, 300_000);
});
