import { defineConfig } from "vitest/config";

export default defineConfig({
  test: {
    environment: "node",
    include: ["test/**/*.test.ts"],
    // The CLI tests run the built command (bin/skewsmith.mjs runs dist/cli.mjs): build it from the source under test first.
    globalSetup: ["test/helpers/buildCli.ts"],
    // CLI tests start the real binary; leave them room on a loaded machine.
    testTimeout: 30_000,
  },
});
