import { defineConfig } from "vitest/config";

export default defineConfig({
  test: { include: ["bench/perf.test.ts"], testTimeout: 3_600_000, pool: "forks", fileParallelism: false },
});
