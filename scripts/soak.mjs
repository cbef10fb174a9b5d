// The load test of a runtime that lives all day (README "Memory and time"): the built
// dist/functions.js in a fresh V8 context that has only a stand-in CustomFunctions object (and
// timers, as the host page has), driven the way a day of recalculation drives it.
//
//   node --expose-gc scripts/soak.mjs            # full run (npm run soak; .ci/run)
//   node --expose-gc scripts/soak.mjs --quick    # smaller shapes and counts (test/soak.test.ts)
//   add --json for one JSON object on the last line
//
// Checks (each prints a line; the exit code is 1 when one fails):
//  1. retained memory after a collection, per shape, against what the stores account for (25 %),
//     and within the add-in's budget;
//  2. the formula registry stays within its byte bound with large arguments;
//  3. a day of 2,000 distinct calls, and a burst of 450 calls (50 fits × 9 functions, function by
//     function) that must not refit on every call;
//  4. hostile arguments (throwing getters, Proxies, revoked Proxies, holes, huge lengths, exotic
//     thrown values) each answer with one error value, and a normal call afterwards is right;
//  5. the slowest accepted shapes, timed and reported (never asserted).
import { spawnSync } from "node:child_process";
import { readFileSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import vm from "node:vm";

const root = join(dirname(fileURLToPath(import.meta.url)), "..");
const quick = process.argv.includes("--quick");
const asJson = process.argv.includes("--json");
if (typeof globalThis.gc !== "function") {
  console.error("run with node --expose-gc");
  process.exit(2);
}

class HostError {
  constructor(code, message) {
    this.code = code;
    this.message = message;
  }
}
const ErrorCode = { invalidValue: "#VALUE!", notAvailable: "#N/A" };

function loadHost() {
  const code = readFileSync(join(root, "dist/functions.js"), "utf8");
  const meta = JSON.parse(readFileSync(join(root, "dist/functions.json"), "utf8"));
  const fns = new Map();
  const CustomFunctions = {
    associate(id, f) {
      if (typeof id === "string") fns.set(id, f);
      else for (const [k, v] of Object.entries(id)) fns.set(k, v);
    },
    Error: HostError,
    ErrorCode,
  };
  const context = vm.createContext({ CustomFunctions, setTimeout, clearTimeout });
  vm.runInContext(code, context, { filename: "functions.js" });
  const engine = context.__colspaceEngine;
  let cell = 0;
  async function call(id, args, address) {
    const m = meta.functions.find((f) => f.id === id);
    const list = m.parameters.map((p) => (p.name in args ? args[p.name] : null));
    list.push({ address: address ?? `Soak!A${++cell}`, parameterAddresses: m.parameters.map(() => ""), functionName: id });
    try {
      return { value: await fns.get(id)(...list) };
    } catch (e) {
      if (e instanceof HostError) return { error: e };
      return { thrown: e };
    }
  }
  return { call, engine, context };
}

function rng(seed) {
  let s = seed >>> 0 || 1;
  return () => {
    s ^= s << 13;
    s >>>= 0;
    s ^= s >>> 17;
    s ^= s << 5;
    s >>>= 0;
    return s / 2 ** 32 - 0.5;
  };
}

/** A 2-D y and x built through JSON, as the host delivers ranges. */
function data(m, k, seed, { collinear = false, poly = false } = {}) {
  const r = rng(seed);
  const x = Array.from({ length: m }, (_, i) => {
    const row = Array.from({ length: k }, () => r() * 4);
    if (poly) row[0] = i / m;
    if (collinear && k > 1) row[k - 1] = row[0] + 1e-9 * r();
    return row;
  });
  const y = x.map((row) => [row.reduce((s, v, j) => s + v * (j + 1), 0.5) + 0.01 * r()]);
  return JSON.parse(JSON.stringify({ y, x }));
}

/** Heap and external memory (array buffers, WebAssembly memories) after full collections; backing stores of collected buffers are released by a later task, so it waits for them. */
async function retained() {
  for (let i = 0; i < 3; i++) {
    globalThis.gc();
    await new Promise((r) => setTimeout(r, 20));
  }
  const u = process.memoryUsage();
  return u.heapUsed + u.external;
}

const MiB = 1024 * 1024;
const report = { quick, memory: [], registry: null, day: null, burst: null, hostile: [], slowest: [], failures: [] };
const check = (ok, what) => {
  if (!ok) report.failures.push(what);
  console.log(`${ok ? "ok  " : "FAIL"} ${what}`);
};

// 1. memory per shape
const shapes = quick
  ? [
      ["5,000×10, fast path", 5000, 10, {}],
      ["5,000×10, nearly collinear", 5000, 10, { collinear: true }],
      ["degree 20, 5,000 rows", 5000, 1, { poly: true }, 20],
    ]
  : [
      ["20,000×10, fast path", 20000, 10, {}],
      ["20,000×10, nearly collinear", 20000, 10, { collinear: true }],
      ["degree 20, 20,000 rows", 20000, 1, { poly: true }, 20],
      ["degree 20, 100,000 rows", 100000, 1, { poly: true }, 20],
    ];
/** A runtime whose code paths have run once (compiled functions and kernels are not a store). */
async function warmHost() {
  const host = loadHost();
  const d = data(200, 2, 1);
  for (const id of ["COEF", "PARAMS", "INFLUENCE", "CHECK"]) {
    await host.call(id, d);
    await host.call(id, { ...data(200, 1, 2, { poly: true }), degree: 20 });
  }
  await host.call("CHECK", { ...data(200, 3, 3, { collinear: true }) });
  host.engine.clearFits();
  return host;
}

const FITS = quick ? 12 : 32;
const shapeArg = process.argv.indexOf("--shape");
if (shapeArg >= 0) {
  // One shape in this process (the parent runs each shape in a fresh process, so memory released
  // late by an earlier shape cannot disturb the measurement).
  const [name, m, k, opts, degree = 1] = shapes[Number(process.argv[shapeArg + 1])];
  const host = await warmHost();
  const scratch0 = host.engine.memoryStats().scratch; // part of the baseline
  const before = await retained();
  for (let f = 0; f < FITS; f++) {
    let d = data(m, k, 1000 + f, opts);
    for (const id of ["COEF", "PARAMS", "INFLUENCE", "CHECK"]) await host.call(id, { ...d, degree });
    d = null;
  }
  const measured = (await retained()) - before;
  const s = host.engine.memoryStats();
  console.log(JSON.stringify({ shape: name, fits: FITS, cached: s.fitEntries, measured, accounted: s.total - scratch0, storeFits: s.fits, registry: s.registry, scratch: s.scratch, budget: s.budget }));
  process.exit(0);
}
for (let i = 0; i < shapes.length; i++) {
  const r = spawnSync(process.execPath, ["--expose-gc", fileURLToPath(import.meta.url), "--shape", String(i), ...(quick ? ["--quick"] : [])], { encoding: "utf8", maxBuffer: 1 << 24 });
  const line = r.stdout.trim().split("\n").pop() ?? "";
  let o;
  try {
    o = JSON.parse(line);
  } catch {
    check(false, `${shapes[i][0]}: the measuring process failed: ${r.stderr.slice(0, 300)}`);
    continue;
  }
  const ratio = o.accounted / o.measured;
  report.memory.push({ shape: o.shape, fits: o.fits, cached: o.cached, measuredMiB: +(o.measured / MiB).toFixed(1), accountedMiB: +(o.accounted / MiB).toFixed(1), ratio: +ratio.toFixed(3), budgetMiB: o.budget / MiB });
  console.log(`     ${o.shape}: ${o.fits} fits, ${o.cached} cached; retained ${(o.measured / MiB).toFixed(1)} MiB, accounted ${(o.accounted / MiB).toFixed(1)} MiB (fits ${(o.storeFits / MiB).toFixed(1)}, registry ${(o.registry / MiB).toFixed(2)}, scratch ${(o.scratch / MiB).toFixed(1)})`);
  check(o.measured <= o.budget, `${o.shape}: retained memory within the ${o.budget / MiB} MiB budget`);
  check(Math.abs(ratio - 1) <= 0.25, `${o.shape}: accounting agrees with the measurement within 25 % (ratio ${ratio.toFixed(2)})`);
}

// 2. the registry with large arguments: addresses only
{
  const host = loadHost();
  const before = await retained();
  const big = data(quick ? 20000 : 200000, 1, 7);
  for (let i = 0; i < 50; i++) await host.call("STATS", big, `Reg!A${i}`);
  const s = host.engine.memoryStats();
  report.registry = { records: s.registryRecords, accountedKiB: +(s.registry / 1024).toFixed(1) };
  check(s.registry <= 4 * MiB, `registry: ${s.registryRecords} records of large calls account ${(s.registry / 1024).toFixed(1)} KiB (bound 4 MiB)`);
  void before;
}

// 3. a day of distinct calls, then a burst
{
  const host = loadHost();
  const ids = ["COEF", "FITTED", "RESID", "COV", "PARAMS", "STATS", "PREDICT", "INFLUENCE", "CHECK", "INVERSE", "LIMITS", "GOF"];
  const r = rng(42);
  const calls = quick ? 400 : 2000;
  const t0 = performance.now();
  let errors = 0;
  let thrown = 0;
  for (let c = 0; c < calls; c++) {
    const m = 20 + Math.floor((r() + 0.5) * (quick ? 500 : 4000));
    const k = 1 + Math.floor((r() + 0.5) * 4);
    const d = data(m, k, c);
    const id = ids[c % ids.length];
    const o = await host.call(id, { ...d, newx: [d.x[0]], newy: [[d.y[0][0]]] }, `Day!A${c}`);
    if (o.error) errors++;
    if (o.thrown) thrown++;
  }
  const ms = performance.now() - t0;
  const measured = await retained();
  const s = host.engine.memoryStats();
  report.day = { calls, seconds: +(ms / 1000).toFixed(1), errorValues: errors, accountedMiB: +(s.total / MiB).toFixed(1), heapAndExternalMiB: +(measured / MiB).toFixed(1) };
  check(thrown === 0, `day: ${calls} distinct calls in ${(ms / 1000).toFixed(1)} s, none threw anything but an error value`);
  check(s.total <= s.budget, `day: the stores account ${(s.total / MiB).toFixed(1)} MiB, within the budget`);

  // burst: 50 fits × 9 functions, recalculated function by function
  host.engine.clearFits();
  const fits = Array.from({ length: 50 }, (_, f) => data(quick ? 300 : 2000, 3, 5000 + f));
  const missesBefore = host.engine.cacheStats().misses;
  const t1 = performance.now();
  let burstThrown = 0;
  for (const id of ["COEF", "FITTED", "RESID", "COV", "PARAMS", "STATS", "PREDICT", "INFLUENCE", "CHECK"])
    for (let f = 0; f < 50; f++) {
      const o = await host.call(id, { ...fits[f], newx: [fits[f].x[0]] }, `Burst!${id}${f}`);
      if (o.thrown) burstThrown++;
    }
  const burstMs = performance.now() - t1;
  const misses = host.engine.cacheStats().misses - missesBefore;
  report.burst = { calls: 450, seconds: +(burstMs / 1000).toFixed(2), fitsComputed: misses };
  check(burstThrown === 0 && misses <= 50, `burst: 450 calls in ${(burstMs / 1000).toFixed(2)} s computed ${misses} fits (one per distinct input: 50)`);
}

// 4. hostile arguments, then a normal call that must be right
{
  const host = loadHost();
  const good = data(30, 2, 3);
  const expected = (await loadHost().call("COEF", good)).value;
  const throwingRow = good.x.slice();
  Object.defineProperty(throwingRow, 5, {
    get() {
      throw new Error("getter");
    },
  });
  const nullThrower = good.x.slice();
  Object.defineProperty(nullThrower, 3, {
    get() {
      throw Object.create(null);
    },
  });
  const trap = new Proxy(good.x, {
    get(t, p) {
      if (p === "length") return t.length;
      throw new Error("trap");
    },
  });
  const { proxy: revoked, revoke } = Proxy.revocable(good.x, {});
  revoke();
  const holes = [];
  holes.length = 30;
  holes[0] = [1, 2];
  const huge = [];
  huge.length = 2 ** 32 - 1;
  const hugeRow = [[]];
  hugeRow[0].length = 2 ** 32 - 1;
  const cases = [
    ["a row whose getter throws", { y: good.y, x: throwingRow }],
    ["a getter that throws an object with no prototype", { y: good.y, x: nullThrower }],
    ["a Proxy whose trap throws", { y: good.y, x: trap }],
    ["a revoked Proxy", { y: good.y, x: revoked }],
    ["an array of holes", { y: good.y, x: holes }],
    ["y with 2^32 − 1 empty slots", { y: huge, x: good.x }],
    ["a row with 2^32 − 1 empty slots", { y: good.y, x: hugeRow }],
    ["a level that is a Proxy", { ...good, level: revoked }],
  ];
  for (const [what, args] of cases)
    for (const id of ["COEF", "PARAMS", "CHECK", "INVERSE", "LINEXY"]) {
      const a = id === "INVERSE" ? { ...args, newy: [[1]] } : id === "LINEXY" ? { ...args, uy: [[0.1]], ux: [[0.1]] } : args;
      const t0 = performance.now();
      const o = await host.call(id, a);
      const ms = performance.now() - t0;
      const ok = !o.thrown && (o.error ? typeof o.error.message === "string" && o.error.message.length > 0 : Array.isArray(o.value));
      report.hostile.push({ what, id, outcome: o.thrown ? `threw ${String(o.thrown?.message ?? "")}` : o.error ? o.error.code : "result", ms: +ms.toFixed(1) });
      check(ok, `hostile ${id}, ${what}: ${o.thrown ? "THREW" : o.error ? `${o.error.code} ${o.error.message.slice(0, 70)}` : "a result"} (${ms.toFixed(1)} ms)`);
    }
  const after = (await host.call("COEF", good)).value;
  check(JSON.stringify(after) === JSON.stringify(expected), "a normal call after the hostile ones gives the same answer as a fresh runtime");
}

// 5. the slowest accepted shapes (reported, not asserted)
if (!quick) {
  const host = loadHost();
  const slow = [
    ["200 parameters × 5,000 rows, nearly collinear", 5000, 199, { collinear: true }, 1],
    ["90 parameters × 123,456 rows, nearly collinear", 123456, 89, { collinear: true }, 1],
    ["degree 20 × 226,000 rows", 226000, 1, { poly: true }, 20],
    ["one x × 1,048,576 rows", 1048576, 1, {}, 1],
    ["10 x × 95,000 rows", 95000, 10, {}, 1],
  ];
  for (const [name, m, k, opts, degree] of slow) {
    const d = data(m, k, 77, opts);
    host.engine.clearFits();
    const times = {};
    for (const id of ["COEF", "FITTED", "RESID", "COV", "PARAMS", "STATS", "PREDICT", "INFLUENCE", "CHECK", "INVERSE", "LIMITS", "GOF"]) {
      const t0 = performance.now();
      const o = await host.call(id, { ...d, degree, newx: d.x.slice(0, 10), newy: d.y.slice(0, 10) });
      times[id] = +(performance.now() - t0).toFixed(0);
      if (o.thrown) report.failures.push(`${name} ${id} threw`);
    }
    const worst = Object.entries(times).sort((a, b) => b[1] - a[1])[0];
    report.slowest.push({ shape: name, ms: times, worst: `${worst[0]} ${worst[1]} ms` });
    console.log(`     ${name}: first call (COEF, the fit) ${times.COEF} ms; slowest ${worst[0]} ${worst[1]} ms`);
  }
  const line = { y: Array.from({ length: 1048576 }, (_, i) => [i * 0.5 + 1]), x: Array.from({ length: 1048576 }, (_, i) => [i]) };
  const t0 = performance.now();
  await host.call("LINEXY", { ...line, uy: [[0.1]], ux: [[0.1]] });
  report.slowest.push({ shape: "LINEXY, 1,048,576 rows", ms: { LINEXY: +(performance.now() - t0).toFixed(0) } });
  console.log(`     LINEXY, 1,048,576 rows: ${(performance.now() - t0).toFixed(0)} ms`);
}

console.log(`${report.failures.length === 0 ? "soak: all checks passed" : `soak: ${report.failures.length} check(s) failed`}`);
if (asJson) console.log(JSON.stringify(report));
process.exit(report.failures.length === 0 ? 0 : 1);
