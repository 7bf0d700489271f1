import { defineConfig } from "vitest/config";

export default defineConfig({
  test: {
    environment: "node",
    include: ["test/**/*.test.ts"],
    // CLI tests start the real binary (about a second each under tsx); leave them room on a loaded machine.
    testTimeout: 30_000,
  },
});
