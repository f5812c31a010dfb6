import { defineConfig } from "vitest/config";
import path from "node:path";

// Three projects: pure unit tests, integration tests against the real PostgreSQL and route
// handlers, and browser tests in Chromium against a served build. scripts/test.sh starts the
// database and the app before calling vitest, and passes their addresses in the environment.
export default defineConfig({
  resolve: {
    alias: {
      "@": path.resolve(__dirname),
      "server-only": path.resolve(__dirname, "tests/support/server-only.ts"),
    },
  },
  test: {
    projects: [
      {
        extends: true,
        test: {
          name: "unit",
          include: ["tests/stats/**/*.test.ts", "tests/scoring/**/*.test.ts", "tests/lib/**/*.test.ts", "tests/cli/**/*.test.ts", "tests/uploads/**/*.test.ts"],
          environment: "node",
          // A guard against a hang, not a speed check: seeded property tests take seconds when the
          // machine is busy.
          testTimeout: 30_000,
        },
      },
      {
        extends: true,
        test: {
          name: "integration",
          include: ["tests/db/**/*.test.ts", "tests/api/**/*.test.ts"],
          // Requests to the app carry its Origin, as a browser's would (lib/api/origin.ts).
          setupFiles: ["tests/support/same-origin-fetch.ts"],
          environment: "node",
          fileParallelism: false,
          testTimeout: 30_000,
          hookTimeout: 60_000,
        },
      },
      {
        extends: true,
        test: {
          name: "e2e",
          include: ["tests/e2e/**/*.test.ts"],
          setupFiles: ["tests/support/same-origin-fetch.ts"],
          environment: "node",
          fileParallelism: false,
          testTimeout: 60_000,
          hookTimeout: 120_000,
        },
      },
    ],
  },
});
