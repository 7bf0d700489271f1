// Runs the command line straight from its TypeScript source through tsx, beside the built one (bin/skewsmith.mjs), so
// the tests can check that the build says exactly what the source says.
import { register } from "tsx/esm/api";

register();
const { main } = await import("../../src/cli/main.ts");
process.exitCode = await main(process.argv.slice(2));
