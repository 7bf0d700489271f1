#!/usr/bin/env node
// Runs the TypeScript CLI straight from source through tsx, so the core needs no build step.
import { register } from "tsx/esm/api";

register();
const { main } = await import("../src/cli/main.ts");
process.exitCode = await main(process.argv.slice(2));
