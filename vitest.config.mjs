// Test runner configuration: unit tests sit beside their subjects under server/src, the
// fixture-driven and protocol tests under tests/. Slow numerics run too (CI has the time).
import { defineConfig } from "vitest/config";

export default defineConfig({
  test: {
    include: ["server/src/**/*.test.ts", "tests/**/*.test.ts"],
    testTimeout: 120_000,
    hookTimeout: 120_000,
    pool: "forks",
    maxWorkers: 2,
  },
});
