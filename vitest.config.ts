import { defineConfig } from "vitest/config";

// One `vitest run` for the whole workspace (scripts/test runs it with PostgreSQL up and the app built):
// the core package (its own config), the app's server tests beside the code, and the browser tests.
export default defineConfig({
  test: {
    // Browser tests mostly wait on Chromium and the server, so a third worker pays off even on two cores.
    maxWorkers: 3,
    projects: [
      "packages/core",
      {
        test: {
          name: "app",
          environment: "node",
          include: ["app/**/*.test.ts", "scripts/**/*.test.ts", "tests/*.test.ts"],
          testTimeout: 20_000,
          hookTimeout: 30_000,
        },
      },
      {
        test: {
          // Requests to the production server (started by the same global setup as the browser tests, or by a test
          // itself when it needs a server of its own): hostile bodies, origins, headers, races, crashes.
          name: "http",
          environment: "node",
          include: ["tests/http/**/*.test.ts"],
          globalSetup: ["tests/e2e/globalSetup.ts"],
          testTimeout: 120_000,
          hookTimeout: 120_000,
        },
      },
      {
        test: {
          name: "e2e",
          environment: "node",
          include: ["tests/e2e/**/*.test.ts"],
          globalSetup: ["tests/e2e/globalSetup.ts"],
          testTimeout: 90_000,
          hookTimeout: 60_000,
          // A loaded machine can take seconds to re-render after a click; poll patiently.
          expect: { poll: { timeout: 15_000, interval: 100 } },
        },
      },
    ],
  },
});
