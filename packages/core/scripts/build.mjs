#!/usr/bin/env node
// Builds the `skewsmith` command: src/cli/main.ts and everything it imports (fast-png, fflate and zod included) bundled
// by esbuild into dist/cli.mjs, ES modules for Node 20. A bundle starts faster than a tree of modules: a few files to
// read and compile instead of hundreds to resolve. The commands load their work with import(), which esbuild splits
// into chunks (dist/chunks/), so --help and --version read only the small first file. Run by `prepare` (pnpm install),
// scripts/test and scripts/start.
import { build } from "esbuild";
import { rmSync } from "node:fs";
import { fileURLToPath } from "node:url";

const root = fileURLToPath(new URL("..", import.meta.url));
rmSync(new URL("../dist", import.meta.url), { recursive: true, force: true }); // no chunk of an older build stays behind
await build({
  absWorkingDir: root,
  // The diagnostics worker is an entry of its own: worker threads start it by file (src/diagnostics/nodePool.ts).
  entryPoints: { cli: "src/cli/main.ts", nodeWorker: "src/diagnostics/nodeWorker.ts" },
  outdir: "dist",
  outExtension: { ".js": ".mjs" },
  chunkNames: "chunks/[name]-[hash]",
  bundle: true,
  splitting: true,
  format: "esm",
  platform: "node",
  target: "node20",
  minifySyntax: true,
  legalComments: "none",
  logLevel: "warning",
});
