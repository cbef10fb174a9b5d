/**
 * One factorization per distinct input: COEF, PARAMS, RESID, STATS and CHECK over the same
 * ranges factor once; any change to one input cell (value or kind) is a different key.
 */
import { beforeEach, describe, expect, it } from "vitest";
import * as L from "../src/functions/lsq";
import { cacheStats, clearCache } from "../src/functions/model";
import { ContentCache } from "../src/functions/cache";

const y = [[1.1], [2.0], [2.8], [4.2], [5.1], [5.8], [7.2]];
const x = [[1, 0.3], [2, 0.1], [3, 0.7], [4, 0.2], [5, 0.9], [6, 0.4], [7, 0.5]];

beforeEach(() => clearCache());

describe("shared factorization", () => {
  it("five functions over the same ranges build one fit", () => {
    L.coef({ y, x });
    L.params({ y, x, level: 0.9 });
    L.resid({ y, x });
    L.stats({ y, x });
    L.check({ y, x });
    expect(cacheStats()).toMatchObject({ misses: 1, hits: 4 });
  });
  it("a cold and a warm call give identical results", () => {
    const cold = L.params({ y, x });
    const warm = L.params({ y, x });
    expect(warm).toEqual(cold);
    expect(cacheStats().hits).toBe(1);
  });
  it("changing any single cell, its kind, or an option misses the cache", () => {
    L.coef({ y, x });
    const variants: [unknown[][], unknown[][], unknown, unknown][] = [
      [y.map((r, i) => (i === 3 ? [4.2000000000000002 + 1e-15] : r)), x, null, null],
      [y, x.map((r, i) => (i === 6 ? [r[0], 0.5000000000000001] : r)), null, null],
      [y.map((r, i) => (i === 2 ? [""] : r)), x, null, null],
      [y.map((r, i) => (i === 2 ? ["n/a"] : r)), x, null, null],
      [y.map((r, i) => (i === 0 ? [-0] : r)), x, null, null],
      [y, x, false, null],
      [y, x.map((r) => [r[0]]), null, null],
      [y, x.map((r) => [r[0]]), null, 2],
    ];
    for (const [yy, xx, ic, deg] of variants) {
      const before = cacheStats().misses;
      L.coef({ y: yy, x: xx, intercept: ic, degree: deg });
      expect(cacheStats().misses).toBe(before + 1);
    }
  });
  it("a change in a cell the lookup hash does not sample still misses (every cell is compared)", () => {
    // 5,000 × 2 = 10,000 cells: the hash samples every second cell, so (row 1234, column 2) is
    // outside the sample. A value, a sign of zero and a kind change there must each miss.
    const m = 5000;
    const yy = Array.from({ length: m }, (_, i) => [Math.sin(i) + i / 100]);
    const xx = Array.from({ length: m }, (_, i) => [i, Math.cos(i)]);
    const base = L.coef({ y: yy, x: xx });
    const changed = (v: unknown) => xx.map((r, i) => (i === 1234 ? [r[0], v] : r));
    for (const v of [xx[1234]![1]! + 1e-9, "text"]) {
      const before = cacheStats().misses;
      const out = L.coef({ y: yy, x: changed(v) });
      expect(cacheStats().misses).toBe(before + 1);
      expect(out).not.toEqual(base);
    }
    const zero = (v: number) => xx.map((r, i) => (i === 1234 ? [r[0], v] : r));
    L.coef({ y: yy, x: zero(0) });
    const before = cacheStats().misses;
    L.coef({ y: yy, x: zero(-0) });
    expect(cacheStats().misses).toBe(before + 1);
  });
  it("compares content on a hit, not only the hash", () => {
    const c = new ContentCache<number>(1e6, () => 8);
    const a = { numbers: [Float64Array.from([1, 2])], bytes: [], flags: "a" };
    const b = { numbers: [Float64Array.from([1, 3])], bytes: [], flags: "a" };
    const sameAs = (want: Float64Array) => (key: { numbers: readonly Float64Array[] }) => key.numbers[0]!.every((v, i) => Object.is(v, want[i]));
    // two different inputs stored under the same hash (a collision) never share a value
    c.insert(7, a, 1);
    c.insert(7, b, 2);
    expect(c.find(7, sameAs(a.numbers[0]!))).toBe(1);
    expect(c.find(7, sameAs(b.numbers[0]!))).toBe(2);
    expect(c.find(7, sameAs(Float64Array.from([9, 9])))).toBeUndefined();
    expect(c.find(8, sameAs(a.numbers[0]!))).toBeUndefined();
  });
  it("is bounded by the bytes its entries really keep, not by a count", () => {
    // each entry: key 8 + 256 bytes, value 1000 bytes → 1264 bytes; a 4,000-byte budget holds 3
    const c = new ContentCache<number>(4000, (v) => v);
    for (let i = 0; i < 10; i++) c.insert(i, { numbers: [Float64Array.from([i])], bytes: [], flags: "" }, 1000);
    expect(c.size).toBe(3);
    expect(c.bytes).toBeLessThanOrEqual(4000);
    expect(c.find(9, () => true)).toBe(1000);
    expect(c.find(0, () => true)).toBeUndefined();
    // many small entries stay together
    const d = new ContentCache<number>(1e6, (v) => v);
    for (let i = 0; i < 500; i++) d.insert(i, { numbers: [], bytes: [], flags: "" }, 100);
    expect(d.size).toBe(500);
  });
  it("measures a value again when it grows, and evicts to stay within the budget", () => {
    const sizes = new Map<string, number>([["a", 100], ["b", 100]]);
    const c = new ContentCache<string>(2000, (v) => sizes.get(v)!);
    c.insert(1, { numbers: [], bytes: [], flags: "" }, "a");
    c.insert(2, { numbers: [], bytes: [], flags: "" }, "b");
    expect(c.size).toBe(2);
    expect(c.find(1, () => true)).toBe("a"); // "a" is used again …
    sizes.set("a", 1900); // … and computes a large by-product
    c.settle();
    expect(c.size).toBe(1); // the least recently used ("b") went
    expect(c.find(1, () => true)).toBe("a");
  });
});
