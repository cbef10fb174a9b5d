import { defineConfig } from "vitest/config";

export default defineConfig({
  test: {
    include: ["test/**/*.test.ts"],
    exclude: ["test/browser/**", "node_modules/**"],
    globalSetup: ["test/global-setup.ts"],
    testTimeout: 120_000,
    hookTimeout: 300_000,
    pool: "forks",
  },
});
