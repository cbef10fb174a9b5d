import { defineConfig } from "vitest/config";

export default defineConfig({
  test: { include: ["bench/accuracy.test.ts"], reporters: ["default"], silent: false },
});
