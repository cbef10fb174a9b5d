/**
 * The LSQ functions as the spreadsheet host calls them: dist/functions.js loaded in node:vm with
 * only a stand-in CustomFunctions object, called by the ids in dist/functions.json.
 */
import { beforeAll, describe, expect, it } from "vitest";
import { HostError, loadHost, outcome, col, type Host } from "./helpers/host";
import { digits, loadNist } from "./helpers/nist";

let host: Host;
beforeAll(() => {
  host = loadHost();
});

/** The frozen public interface: ids and parameter lists never change (shared workbooks depend on them). */
const FIT = ["y", "x", "weights?", "intercept?", "degree?"];
const FROZEN: Record<string, string[]> = {
  COEF: [...FIT, "headers?", "weighting?"],
  FITTED: [...FIT, "weighting?"],
  RESID: [...FIT, "weighting?"],
  COV: [...FIT, "headers?", "weighting?"],
  PARAMS: [...FIT, "level?", "headers?", "weighting?"],
  STATS: [...FIT, "weighting?"],
  PREDICT: ["newx", ...FIT, "interval?", "level?", "headers?", "weighting?"],
  INFLUENCE: [...FIT, "headers?", "weighting?"],
  CHECK: [...FIT, "weighting?", "newx?", "newy?"],
  INVERSE: ["newy", ...FIT, "level?", "replicates?", "ureading?", "headers?", "weighting?"],
  LIMITS: [...FIT, "method?", "alpha?", "beta?", "k?", "samples?", "weighting?"],
  GOF: [...FIT, "weighting?"],
  LINEXY: ["y", "x", "uy", "ux", "correlation?", "level?"],
};

describe("metadata (dist/functions.json)", () => {
  it("has exactly the frozen ids, names and parameter lists", () => {
    const got: Record<string, string[]> = {};
    for (const f of host.meta.functions) {
      expect(f.name).toBe(f.id);
      got[f.id] = f.parameters.map((p) => p.name + (p.optional ? "?" : ""));
    }
    expect(got).toEqual(FROZEN);
  });
  it("lets error values into any-typed parameters and asks for addresses", () => {
    expect(host.meta.allowErrorForDataTypeAny).toBe(true);
    for (const f of host.meta.functions) {
      expect(f.options?.requiresAddress, f.id).toBe(true);
      expect(f.options?.requiresParameterAddresses, f.id).toBe(true);
      for (const p of f.parameters) expect(p.type ?? "any", `${f.id}.${p.name}`).toBe("any");
      expect(f.result.dimensionality).toBe("matrix");
    }
  });
  it("associates every function in a context that has only CustomFunctions", () => {
    expect([...host.fns.keys()].sort()).toEqual(Object.keys(FROZEN).sort());
  });
});

// An invented scenario: a bench thermometer logged in °C and, by a second logger, in °F.
const tempC = [12.5, 14.1, 15.8, 17.2, 18.9, 20.4, 22.0, 23.7];
const tempF = tempC.map((c) => 32 + 1.8 * c);
const load = [3.1, 2.4, 4.0, 3.3, 5.2, 4.8, 5.9, 6.1];
const drift = [0.512, 0.559, 0.641, 0.668, 0.757, 0.786, 0.858, 0.905];

describe("COEF and the dependency message", () => {
  it("flags the later of two dependent columns with the relation in its #N/A message", () => {
    const x = tempC.map((c, i) => [c, load[i], tempF[i]]);
    const { value } = outcome(host, "COEF", { y: col(drift), x });
    expect(value).toBeDefined();
    expect(value!.length).toBe(4);
    expect(typeof value![0]![0]).toBe("number");
    expect(typeof value![1]![0]).toBe("number");
    const na = value![3]![0] as HostError;
    expect(na).toBeInstanceOf(HostError);
    expect(na.code).toBe("#N/A");
    expect(na.message).toBe("not identifiable: x3 = 32 + 1.8 × x1");
  });
});

describe("NIST StRD through the host path (source: NIST StRD certified values)", () => {
  const sets = loadNist();
  it("COEF, PARAMS and STATS reach ≥ 13 digits on every dataset", () => {
    for (const d of sets) {
      const deg = d.predictors.polynomialDegree ?? 1;
      const y = d.rows.map((r) => [r[0]]);
      const x = d.rows.map((r) => r.slice(1));
      const args = { y, x, intercept: d.intercept, degree: deg };
      const b = host.call("COEF", args) as number[][];
      const p = host.call("PARAMS", args) as number[][];
      const s = host.call("STATS", args) as unknown[][];
      d.certified.coefficients.forEach((c, i) => {
        expect(digits(b[i]![0]!, c), `${d.name} B${i}`).toBeGreaterThanOrEqual(13);
        expect(p[i]![0]).toBe(b[i]![0]);
      });
      d.certified.standardErrors.forEach((c, i) => expect(digits(p[i]![1]!, c), `${d.name} se${i}`).toBeGreaterThanOrEqual(13));
      expect(digits(s[6]![1] as number, d.certified.residualStandardDeviation), `${d.name} sd`).toBeGreaterThanOrEqual(13);
      expect(digits(s[7]![1] as number, d.certified.rSquared), `${d.name} R2`).toBeGreaterThanOrEqual(13);
    }
  });
});

describe("missing values: blanks, text, booleans and error values skip the row", () => {
  const y = [[1.0], [2.1], [""], [3.9], ["n/a"], [6.2], [7.0], [true], [9.1]];
  const x = [[1], [2], [3], [4], [5], [null], [7], [8], [new HostError("#N/A")]];
  it("fits the remaining rows and reports the skipped ones", () => {
    const s = host.call("STATS", { y, x }) as unknown[][];
    expect(s[0]).toEqual(["observations used", 4]);
    expect(s[1]).toEqual(["observations skipped", 5]);
  });
  it("keeps one FITTED row per input row, #N/A with the reason for skipped rows", () => {
    const f = host.call("FITTED", { y, x }) as unknown[][];
    expect(f.length).toBe(9);
    expect(typeof f[0]![0]).toBe("number");
    const e2 = f[2]![0] as HostError;
    expect(e2.code).toBe("#N/A");
    expect(e2.message).toBe("row 3 was skipped: y is empty");
    expect((f[4]![0] as HostError).message).toBe("row 5 was skipped: y is text");
    expect((f[5]![0] as HostError).message).toBe("row 6 was skipped: x is empty");
    expect((f[7]![0] as HostError).message).toBe("row 8 was skipped: y is TRUE/FALSE");
    expect((f[8]![0] as HostError).message).toBe("row 9 was skipped: x is an error value");
  });
  it("gives the same coefficients as the complete rows alone", () => {
    const keep = [0, 1, 3, 6];
    const a = host.call("COEF", { y, x }) as number[][];
    const b = host.call("COEF", { y: keep.map((i) => y[i]), x: keep.map((i) => x[i]) }) as number[][];
    expect(a).toEqual(b);
  });
  it("does not mutate its inputs", () => {
    const before = JSON.stringify([y, x]);
    host.call("INFLUENCE", { y, x });
    host.call("CHECK", { y, x });
    expect(JSON.stringify([y, x])).toBe(before);
  });
});

describe("bad input gives one error value that says what and where", () => {
  const y = col([1, 2, 3, 4, 5]);
  const x = col([1, 2, 3.5, 4, 5.5]);
  const cases: [string, string, Record<string, unknown>, string, RegExp][] = [
    ["rows differ", "COEF", { y, x: col([1, 2, 3]) }, "#VALUE!", /y has 5 values but x has 3 rows/],
    ["several x with degree 2", "COEF", { y, x: x.map((r) => [r[0], 1]), degree: 2 }, "#VALUE!", /degree 2 needs x to be a single column/],
    ["degree 0", "COEF", { y, x, degree: 0 }, "#VALUE!", /degree must be a whole number from 1 to 20/],
    ["degree 2.5", "COEF", { y, x, degree: 2.5 }, "#VALUE!", /whole number/],
    ["degree text", "COEF", { y, x, degree: "two" }, "#VALUE!", /degree must be a number/],
    ["negative weight", "COEF", { y, x, weights: col([1, 1, -1, 1, 1]) }, "#VALUE!", /weight in row 3 is negative/],
    ["too few rows", "COEF", { y: col([1, 2]), x: [[1, 2], [3, 5]] }, "#N/A", /only 2 usable rows for 3 parameters/],
    ["level 1", "PARAMS", { y, x, level: 1 }, "#VALUE!", /level must be between 0 and 1/],
    ["interval word", "PREDICT", { y, x, newx: col([6]), interval: "foo" }, "#VALUE!", /interval must be "confidence" or "prediction"/],
    ["newx columns", "PREDICT", { y, x: x.map((r, i) => [r[0], i % 2]), newx: [[1, 2, 3]] }, "#VALUE!", /newx must have 2 columns like x/],
    ["ragged x", "COEF", { y, x: [[1], [2, 3], [3], [4], [5]] }, "#VALUE!", /rows of different lengths/],
    ["y not a vector", "COEF", { y: [[1, 2], [3, 4]], x: col([1, 2]) }, "#VALUE!", /single column or a single row/],
    ["intercept word", "COEF", { y, x, intercept: "maybe" }, "#VALUE!", /intercept must be TRUE or FALSE/],
    ["infinite x", "COEF", { y, x: col([1, 2, Infinity, 4, 5]) }, "#VALUE!", /row 3.*infinite/],
    ["zero uncertainty", "COEF", { y, x, weights: col([0.1, 0.1, 0, 0.1, 0.1]), weighting: "uncertainty" }, "#VALUE!", /uncertainty in row 3 is zero/],
    ["uncertainty without a range", "COEF", { y, x, weighting: "uncertainty" }, "#VALUE!", /no weights range was given/],
    ["weighting word", "COEF", { y, x, weighting: "sigma" }, "#VALUE!", /weighting must be "relative" or "uncertainty"/],
  ];
  for (const [what, id, args, code, msg] of cases)
    it(`${what} → ${code}`, () => {
      const o = outcome(host, id, args);
      expect(o.thrown, String(o.thrown)).toBeUndefined();
      expect(o.error, "expected an error value").toBeDefined();
      expect(o.error!.code).toBe(code);
      expect(o.error!.message).toMatch(msg);
    });
});

describe("result layouts", () => {
  const y = col([2.9, 5.1, 7.2, 8.8, 11.1, 13.0]);
  const x = [[1, 0.5], [2, 0.1], [3, 0.9], [4, 0.4], [5, 0.8], [6, 0.2]];
  it("have the documented shapes and finite numbers", () => {
    const shape = (v: unknown) => [(v as unknown[][]).length, (v as unknown[][])[0]!.length];
    expect(shape(host.call("COEF", { y, x }))).toEqual([3, 1]);
    expect(shape(host.call("FITTED", { y, x }))).toEqual([6, 1]);
    expect(shape(host.call("RESID", { y, x }))).toEqual([6, 1]);
    expect(shape(host.call("COV", { y, x }))).toEqual([3, 3]);
    expect(shape(host.call("PARAMS", { y, x }))).toEqual([3, 6]);
    expect(shape(host.call("STATS", { y, x }))).toEqual([15, 2]);
    expect(shape(host.call("PREDICT", { y, x, newx: [[7, 0.5], [8, 0.3]] }))).toEqual([2, 1]);
    expect(shape(host.call("PREDICT", { y, x, newx: [[7, 0.5]], interval: "prediction" }))).toEqual([1, 3]);
    expect(shape(host.call("INFLUENCE", { y, x }))).toEqual([6, 4]);
    expect(shape(host.call("CHECK", { y, x }))[1]).toBe(1);
  });
  it("row-oriented y gives row-oriented fitted values", () => {
    const yr = [[2.9, 5.1, 7.2, 8.8, 11.1, 13.0]];
    const xr = [[1, 2, 3, 4, 5, 6]];
    const f = host.call("FITTED", { y: yr, x: xr }) as number[][];
    expect(f.length).toBe(1);
    expect(f[0]!.length).toBe(6);
  });
  it("CHECK says nothing was found on a clean fit", () => {
    const c = host.call("CHECK", { y, x }) as string[][];
    expect(c).toEqual([["No problems found: every column could be estimated and no row was skipped."]]);
  });
});
