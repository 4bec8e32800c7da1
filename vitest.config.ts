import { defineConfig } from "vitest/config";

export default defineConfig({
  test: {
    include: ["test/engine/**/*.test.ts", "test/app/**/*.test.ts", "test/app/**/*.test.tsx", "test/cli/**/*.test.ts"],
    environment: "node",
    testTimeout: 60_000,
    pool: "forks",
  },
});
