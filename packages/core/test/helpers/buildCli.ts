import { execFileSync } from "node:child_process";
import { fileURLToPath } from "node:url";

/** Vitest global setup: builds dist/ from the source under test, so the CLI tests never run a stale build. */
export default function setup(): void {
  execFileSync(process.execPath, [fileURLToPath(new URL("../../scripts/build.mjs", import.meta.url))], { stdio: "inherit" });
}
