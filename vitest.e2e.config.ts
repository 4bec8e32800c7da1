// End-to-end tests: browser mode in Debian Chromium (playwright-core). Run by `npm run test:e2e`,
// which builds the renderer first. One file at a time: each launches its own browser.
import { defineConfig } from "vitest/config";

export default defineConfig({
  test: {
    include: ["test/e2e/**/*.test.ts"],
    environment: "node",
    testTimeout: 120_000,
    hookTimeout: 120_000,
    pool: "forks",
    maxWorkers: 1,
    fileParallelism: false,
  },
});
