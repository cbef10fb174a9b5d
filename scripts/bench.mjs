// `npm run bench [-- --json] [-- --sizes 1000x5,10000x10]`: runs bench/perf.test.ts once per size,
// each in its own process (so peak memory is per size), and prints a table or one JSON object.
import { spawnSync } from "node:child_process";
import { readFileSync, rmSync } from "node:fs";
import { tmpdir, cpus } from "node:os";
import { join, resolve } from "node:path";
import { fileURLToPath } from "node:url";

const args = process.argv.slice(2);
const json = args.includes("--json");
const si = args.indexOf("--sizes");
const sizes = (si >= 0 ? args[si + 1] : "1000x5,10000x10,100000x20,1000000x10").split(",").map((s) => s.split("x").map(Number));
const root = resolve(fileURLToPath(new URL("..", import.meta.url)));
const results = [];
for (const [rows, cols] of sizes) {
  const out = join(tmpdir(), `colspace-bench-${rows}x${cols}.json`);
  rmSync(out, { force: true });
  const r = spawnSync(process.execPath, [join(root, "node_modules/vitest/vitest.mjs"), "run", "--config", "vitest.bench.config.mts", "--silent"], {
    cwd: root,
    env: { ...process.env, BENCH_ROWS: String(rows), BENCH_COLS: String(cols), BENCH_OUT: out, NODE_OPTIONS: "--max-old-space-size=16384" },
    encoding: "utf8",
  });
  if (r.status !== 0) {
    console.error(r.stdout, r.stderr);
    process.exit(1);
  }
  const d = JSON.parse(readFileSync(out, "utf8"));
  d.ratios = {
    engineVsMlMatrix: d.mlMatrixMs / d.engineMs,
    engineVsNumpy: d.numpyMs ? d.engineMs / d.numpyMs : null,
    fiveVsOne: d.fiveMs / d.coefMs,
    // Five calls if the four after the first did nothing but look up the cached fit.
    lookupFloorVsOne: (d.coefMs + 4 * d.lookupMs) / d.coefMs,
    tenYVsOne: d.tenYMs / d.coefMs,
    enginePeakMemoryVsInput: d.enginePeakMB / d.inputMB,
  };
  results.push(d);
  if (!json) process.stderr.write(`done ${rows}×${cols}\n`);
}
const machine = { cpu: cpus()[0]?.model, cores: cpus().length, node: process.version };
if (json) console.log(JSON.stringify({ machine, results }, null, 2));
else {
  const f = (v, d = 1) => (v === null || v === undefined ? "n/a" : Number(v).toFixed(d));
  console.log(`\nColspace benchmark (${machine.cpu}, ${machine.cores} cores, Node ${machine.node}); median ms\n`);
  console.log("size           engine fit   COEF   5 functions   10 y columns   lookup   ml-matrix   numpy   | ml-matrix/engine  engine/numpy  five/one  (lookups only)  ten y/one  engine memory/input");
  for (const d of results)
    console.log(
      `${(d.rows + "×" + d.cols).padEnd(14)} ${f(d.engineMs).padStart(10)} ${f(d.coefMs).padStart(6)} ${f(d.fiveMs).padStart(13)} ${f(d.tenYMs).padStart(14)} ${f(d.lookupMs).padStart(8)} ${f(d.mlMatrixMs).padStart(11)} ${f(d.numpyMs).padStart(7)}   | ${f(d.ratios.engineVsMlMatrix, 2).padStart(16)} ${f(d.ratios.engineVsNumpy, 2).padStart(13)} ${f(d.ratios.fiveVsOne, 2).padStart(9)} ${f(d.ratios.lookupFloorVsOne, 2).padStart(15)} ${f(d.ratios.tenYVsOne, 2).padStart(10)} ${f(d.ratios.enginePeakMemoryVsInput, 1).padStart(20)}`,
    );
  console.log("\nengine fit = factorization + refinement + coefficients + residuals + covariance; numpy = lstsq (coefficients only, 1 thread).");
  for (const d of results) console.log(`${d.rows}×${d.cols} five functions, each call: ${Object.entries(d.fiveCallsMs).map(([n, v]) => `${n} ${f(v)}`).join(", ")} ms`);
  for (const d of results) console.log(`${d.rows}×${d.cols} ten y columns against one x: each column after the first ${f(d.tenYLaterMs)} ms (median), against ${f(d.coefMs)} ms for the first`);
  console.log("lookup = one cache lookup on the same ranges: every argument cell read and compared with the stored copy (paid by each call after the first).");
  console.log("(lookups only) = (COEF + 4 × lookup) / COEF: five/one if the four later calls did nothing but find the cached fit.");
  console.log("engine memory = peak resident memory the engine added while fitting, over the input's size as Float64 (x and y).");
}
