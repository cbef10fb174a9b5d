/**
 * `npm run bench` (via scripts/bench.mjs): one size per process, seeded data, median times.
 * (a) engine full fit: factorization, refinement, coefficients, residuals and covariance;
 * (b) LSQ.COEF end to end from a 2-D array, as the host calls it (cache cleared first);
 * (c) five LSQ functions over the same ranges, one after another (cache cleared first);
 * (d) ml-matrix's QR solve on the same design;
 * (e) numpy.linalg.lstsq single-threaded on the same data (scripts/bench_numpy.py), when
 *     Debian's python3-numpy is installed;
 * (f) one cache lookup on the same ranges (the full comparison of the argument cells that every
 *     call after the first pays before it may reuse the fit);
 * (g) LSQ.COEF on ten y columns against the same x, one after another (cache cleared first): the
 *     nine after the first share its factorization (several analytes against one set of standards);
 *     the sum of the ten calls' times.
 * Results go to the file named by BENCH_OUT as JSON; scripts/bench.mjs prints the table.
 */
import { it } from "vitest";
import { writeFileSync } from "node:fs";
import { spawnSync } from "node:child_process";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { Matrix, QrDecomposition } from "ml-matrix";
import { LeastSquaresFit } from "../src/core/fit";
import * as L from "../src/functions/lsq";
import { clearCache, getModel } from "../src/functions/model";

/** Seeded normal generator (mulberry32 + Box–Muller). */
function gen(seed: number): () => number {
  let a = seed >>> 0;
  const u = (): number => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  return () => Math.sqrt(-2 * Math.log(Math.max(u(), 1e-300))) * Math.cos(2 * Math.PI * u());
}

function median(xs: number[]): number {
  const s = [...xs].sort((p, q) => p - q);
  return s[Math.floor(s.length / 2)]!;
}

function time(reps: number, f: () => unknown): { ms: number; keep: unknown } {
  const ts: number[] = [];
  let keep: unknown = null;
  for (let r = 0; r < reps; r++) {
    const t0 = performance.now();
    keep = f();
    ts.push(performance.now() - t0);
  }
  return { ms: median(ts), keep };
}

it("benchmark one size", () => {
  const m = Number(process.env.BENCH_ROWS ?? 1000);
  const k = Number(process.env.BENCH_COLS ?? 5);
  const reps = Number(process.env.BENCH_REPS ?? (m >= 1e6 ? 5 : m >= 1e5 ? 9 : 15));
  const g = gen(12345 + m + k);
  const x = new Float64Array(m * k);
  for (let i = 0; i < x.length; i++) x[i] = g() * (1 + (i % 7));
  const y = new Float64Array(m);
  for (let i = 0; i < m; i++) {
    let v = g();
    for (let j = 0; j < k; j++) v += x[j * m + i]! * (j + 1) * 0.1;
    y[i] = v;
  }
  const inputBytes = (x.length + y.length) * 8;
  const out: Record<string, unknown> = { rows: m, cols: k };

  const fullFit = (): LeastSquaresFit => {
    const f = new LeastSquaresFit({ y, x, rows: m, cols: k, intercept: true });
    f.coefficients();
    f.fittedAndResiduals();
    f.scaledCovariance();
    return f;
  };
  // Peak memory of one full fit on top of the data: the process high-water mark after it, minus
  // the resident size before (nothing else has been allocated yet).
  const rssBeforeEngine = process.memoryUsage().rss;
  const first = fullFit();
  out.enginePeakMB = Math.max(0, process.resourceUsage().maxRSS * 1024 - rssBeforeEngine) / 2 ** 20;
  const engine = time(reps, fullFit);
  out.engineMs = engine.ms;
  void first;

  // The host hands a custom function its ranges as arrays decoded from a JSON message; build them
  // the same way (JSON.parse gives the runtime's packed arrays of numbers, as the host's do).
  const y2 = JSON.parse(JSON.stringify(Array.from(y, (v) => [v]))) as number[][];
  const x2 = JSON.parse(JSON.stringify(Array.from({ length: m }, (_, i) => Array.from({ length: k }, (_, j) => x[j * m + i]!)))) as number[][];
  out.coefMs = time(reps, () => {
    clearCache();
    return L.coef({ y: y2, x: x2 });
  }).ms;
  // Five functions one after another; each call is also timed on its own, to show where the time
  // beyond the first goes.
  const calls: [string, () => unknown][] = [
    ["COEF", () => L.coef({ y: y2, x: x2 })],
    ["PARAMS", () => L.params({ y: y2, x: x2 })],
    ["RESID", () => L.resid({ y: y2, x: x2 })],
    ["STATS", () => L.stats({ y: y2, x: x2 })],
    ["CHECK", () => L.check({ y: y2, x: x2 })],
  ];
  const perCall: number[][] = calls.map(() => []);
  out.fiveMs = time(reps, () => {
    clearCache();
    let last: unknown = null;
    calls.forEach(([, call], c) => {
      const t0 = performance.now();
      last = call();
      perCall[c]!.push(performance.now() - t0);
    });
    return last;
  }).ms;
  out.fiveCallsMs = Object.fromEntries(calls.map(([name], c) => [name, median(perCall[c]!)]));
  // (f) The fixed price of every call after the first: finding the cached fit, which means reading
  // every argument cell and comparing it with the stored copy (nothing else is computed).
  clearCache();
  L.coef({ y: y2, x: x2 });
  out.lookupMs = time(reps, () => getModel({ y: y2, x: x2 })).ms;

  // (g) Ten y columns against one x: y plus seeded noise. Each column's host array is decoded just
  // before its call (untimed) and dropped after it, as the host's arguments are: ten million live
  // one-cell arrays at once would make every garbage collection, not the fits, the measurement.
  const tenY = Array.from({ length: 10 }, (_, c) => JSON.stringify(Array.from(y, (v) => [v + (c === 0 ? 0 : 0.1 * g())])));
  const perColumn: number[][] = tenY.map(() => []);
  const tenRuns: number[] = [];
  for (let r = 0; r < reps; r++) {
    clearCache();
    let total = 0;
    tenY.forEach((text, c) => {
      const yc = JSON.parse(text) as number[][];
      const t0 = performance.now();
      L.coef({ y: yc, x: x2 });
      const dt = performance.now() - t0;
      perColumn[c]!.push(dt);
      total += dt;
    });
    tenRuns.push(total);
  }
  out.tenYMs = median(tenRuns);
  out.tenYLaterMs = median(perColumn.slice(1).map((ts) => median(ts)));

  const mlReps = m >= 1e6 ? 1 : Math.min(reps, 3);
  const design = new Matrix(m, k + 1);
  for (let i = 0; i < m; i++) {
    design.set(i, 0, 1);
    for (let j = 0; j < k; j++) design.set(i, j + 1, x[j * m + i]!);
  }
  const rhs = Matrix.columnVector(Array.from(y));
  out.mlMatrixMs = time(mlReps, () => new QrDecomposition(design).solve(rhs)).ms;

  // numpy anchor on the same data, single-threaded
  const dir = tmpdir();
  const fx = join(dir, `colspace-bench-x-${process.pid}.f64`);
  const fy = join(dir, `colspace-bench-y-${process.pid}.f64`);
  writeFileSync(fx, Buffer.from(x.buffer));
  writeFileSync(fy, Buffer.from(y.buffer));
  const py = spawnSync("/usr/bin/python3", [resolve(__dirname, "../scripts/bench_numpy.py"), fx, fy, String(m), String(k), String(reps)], {
    env: { ...process.env, OPENBLAS_NUM_THREADS: "1", OMP_NUM_THREADS: "1", MKL_NUM_THREADS: "1" },
    encoding: "utf8",
  });
  out.numpyMs = py.status === 0 ? Number(py.stdout.trim()) : null;
  out.numpyNote = py.status === 0 ? "numpy.linalg.lstsq, 1 thread" : `numpy unavailable: ${(py.stderr || py.error?.message || "").toString().split("\n").slice(-2).join(" ")}`;
  out.processPeakRssMB = process.resourceUsage().maxRSS / 1024;
  out.inputMB = inputBytes / 2 ** 20;
  out.keep = (engine.keep as LeastSquaresFit).rank; // keep results alive
  writeFileSync(process.env.BENCH_OUT ?? join(dir, "colspace-bench.json"), JSON.stringify(out));
}, 3_600_000);
