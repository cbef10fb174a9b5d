/**
 * Reliability checks through the host path (dist/functions.js in node:vm) that need structured
 * rather than random inputs: exact power-of-two scaling up to 2^±500, the LAPACK-style backward
 * error of the residual on generated full-rank problems, the documented size limits at their
 * boundary, and findings built by composition.
 */
import fc from "fast-check";
import { beforeAll, describe, expect, it } from "vitest";
import { HostError, loadHost, type Host } from "./helpers/host";
import { normal, rng } from "./helpers/gen";
import { LIMITS, checkSize } from "../src/functions/model";
import { SheetError } from "../src/functions/cellerror";
import { findings, findingText } from "../src/findings/findings";
import { LeastSquaresFit } from "../src/core/fit";

const EPS = 2.220446049250313e-16;
let host: Host;
beforeAll(() => {
  host = loadHost();
});

function data(m: number, k: number, seed: number) {
  const r = rng(seed);
  const x = Array.from({ length: m }, () => Array.from({ length: k }, () => normal(r) * 3));
  const y = x.map((row) => [row.reduce((s, v, j) => s + v * (j - 1.5), 0.7) + normal(r)]);
  return { x, y };
}

describe("exact scaling through the host path", () => {
  it("y·2^a and x column c·2^b (|a|, |b| ≤ 500) scale COEF, PARAMS and STATS exactly", () => {
    fc.assert(
      fc.property(fc.integer({ min: 4, max: 40 }), fc.integer({ min: 1, max: 5 }), fc.integer(), fc.integer({ min: -500, max: 500 }), fc.integer({ min: -500, max: 500 }), fc.nat(), (m, k, seed, a, b, c0) => {
        fc.pre(m > k + 2);
        const c = c0 % k;
        const { x, y } = data(m, k, seed);
        const y2 = y.map((r) => [r[0]! * 2 ** a]);
        const x2 = x.map((r) => r.map((v, j) => (j === c ? v * 2 ** b : v)));
        const p0 = host.call("PARAMS", { y, x }) as number[][];
        const p1 = host.call("PARAMS", { y: y2, x: x2 }) as number[][];
        const s0 = host.call("STATS", { y, x }) as unknown[][];
        const s1 = host.call("STATS", { y: y2, x: x2 }) as unknown[][];
        p0.forEach((row, j) => {
          const f = j === c + 1 ? 2 ** (a - b) : 2 ** a;
          const expected = [row[0]! * f, row[1]! * f, row[2], row[3], row[4]! * f, row[5]! * f];
          // representable results scale exactly; estimates that would overflow are #N/A, never Infinity
          expected.forEach((e, t) => {
            if (typeof e === "number" && Number.isFinite(e) && Math.abs(e) > 1e-290) expect(p1[j]![t]).toBe(e);
          });
        });
        expect(s1[6]![1]).toBe((s0[6]![1] as number) * 2 ** a); // residual standard error
        expect(s1[7]![1]).toBe(s0[7]![1]); // R²
        expect(s1[9]![1]).toBe(s0[9]![1]); // F
      }),
      { numRuns: 300, seed: 99 },
    );
  });
});

describe("backward error of the residual on full-rank problems (LAPACK least-squares test style)", () => {
  it("‖X̂ᵀ r‖ / (‖X̂‖_F ‖r‖ ε max(m, n)) ≤ 10 with X̂ the column-scaled design", () => {
    fc.assert(
      fc.property(fc.integer({ min: 3, max: 60 }), fc.integer({ min: 1, max: 8 }), fc.integer(), (m, k, seed) => {
        fc.pre(m > k + 1);
        const { x, y } = data(m, k, seed);
        const st = host.call("STATS", { y, x }) as unknown[][];
        fc.pre(st[3]![1] === st[2]![1] && (st[4]![1] as number) > 0);
        const r = (host.call("RESID", { y, x }) as number[][]).map((v) => v[0]!);
        const cols = [Array<number>(m).fill(1), ...Array.from({ length: k }, (_, j) => x.map((row) => row[j]!))];
        let xn = 0;
        let g = 0;
        for (const col of cols) {
          const nrm = Math.hypot(...col);
          let d = 0;
          for (let i = 0; i < m; i++) d += (col[i]! / nrm) * r[i]!;
          g += d * d;
          xn += 1;
        }
        const rn = Math.hypot(...r);
        fc.pre(rn > 0);
        const ratio = Math.sqrt(g) / (Math.sqrt(xn) * rn * EPS * Math.max(m, k + 1));
        expect(ratio).toBeLessThanOrEqual(10);
      }),
      { numRuns: 500, seed: 7 },
    );
  });
});

describe("size limits (README 'Size limits')", () => {
  it("accept inputs at the limits and refuse one cell, one parameter or one unit of work more", () => {
    const throwsNum = (f: () => void): void => {
      try {
        f();
        throw new Error("expected a refusal");
      } catch (e) {
        expect(e).toBeInstanceOf(SheetError);
        expect((e as SheetError).code).toBe("#VALUE!");
      }
    };
    // rows: a worksheet's row count
    expect(() => checkSize(LIMITS.maxRows, 1, false, 2)).not.toThrow();
    throwsNum(() => checkSize(LIMITS.maxRows + 1, 1, false, 2));
    // cells: m·(k + 1) with k = 11, no weights
    expect(() => checkSize(LIMITS.maxCells / 12, 11, false, 12)).not.toThrow();
    throwsNum(() => checkSize(LIMITS.maxCells / 12 + 1, 11, false, 12));
    // polynomials: rows × parameters² with p = degree + 1
    const mp = Math.floor(LIMITS.maxPolynomialWork / 21 ** 2);
    expect(() => checkSize(mp, 1, false, 21, 20)).not.toThrow();
    throwsNum(() => checkSize(mp + 1, 1, false, 21, 20));
    expect(() => checkSize(100, LIMITS.maxParameters - 1, false, LIMITS.maxParameters)).not.toThrow();
    throwsNum(() => checkSize(100, LIMITS.maxParameters, false, LIMITS.maxParameters + 1));
    const m = LIMITS.maxWork / 100 ** 2;
    expect(() => checkSize(m, 99, false, 100)).not.toThrow();
    throwsNum(() => checkSize(m + 1, 99, false, 100));
  });
  it("answers #VALUE! with the reason through the host path for too many parameters", () => {
    const k = LIMITS.maxParameters; // + intercept = one too many
    const x = Array.from({ length: 3 }, (_, i) => Array.from({ length: k }, (_, j) => i + j));
    try {
      host.call("COEF", { y: [[1], [2], [3]], x });
      throw new Error("expected an error value");
    } catch (e) {
      expect(e).toBeInstanceOf(HostError);
      expect((e as HostError).code).toBe("#VALUE!");
      expect((e as HostError).message).toMatch(/201 parameters; the LSQ functions accept at most 200/);
    }
  });
});

describe("findings are composed from data, not concatenated markup", () => {
  it("keeps workbook labels as opaque label parts", () => {
    const m = 6;
    const c = [1, 2, 3, 4, 5, 6.5];
    const x = new Float64Array(m * 2);
    c.forEach((v, i) => {
      x[i] = v;
      x[m + i] = 2 * v;
    });
    const fit = new LeastSquaresFit({ y: Float64Array.from([1, 2.2, 2.9, 4.1, 5, 6.6]), x, rows: m, cols: 2, intercept: true });
    const evil = "<img src=x onerror=alert(1)>";
    const fs = findings({ fit, labels: ["intercept", "a & b", evil] });
    const dep = fs.find((f) => f.id === "dependent-columns")!;
    const labels = dep.what.filter((p) => p.kind === "label").map((p) => p.text);
    expect(labels).toEqual([evil, "a & b"]);
    expect(findingText(dep)).toContain(`${evil} = 2 × a & b`);
    for (const f of fs) for (const p of [...f.what, ...f.done, ...f.advice]) expect(["text", "label", "number", "rows"]).toContain(p.kind);
  });
});
