#!/usr/bin/env node
// Runs the built command line, dist/cli.mjs: esbuild's bundle of src/cli/main.ts (scripts/build.mjs), made when the
// workspace is installed and again by scripts/test and scripts/start, so that a call starts as fast as Node itself.
import { existsSync } from "node:fs";

const cli = new URL("../dist/cli.mjs", import.meta.url);
if (!existsSync(cli)) {
  process.stderr.write(
    "skewsmith: the command line is not built yet (packages/core/dist/cli.mjs is missing); build it with\n" +
      "  npx --yes pnpm@10.34.9 --filter @skewsmith/core build\n",
  );
  process.exit(1);
}
const { main } = await import(cli.href);
process.exitCode = await main(process.argv.slice(2));
