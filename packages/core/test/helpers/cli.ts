import { execFile } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";

/** The real `skewsmith` binary of this package (it runs the build, dist/cli.mjs). */
const BIN = fileURLToPath(new URL("../../bin/skewsmith.mjs", import.meta.url));
/** The same command line run from its TypeScript source. */
const SOURCE = fileURLToPath(new URL("./sourceCli.mjs", import.meta.url));

export interface CliResult {
  readonly code: number;
  readonly stdout: string;
  readonly stderr: string;
}

/** Runs `node bin/skewsmith.mjs …args` (or, with `from: "source"`, the TypeScript source) in `cwd` and collects its exit code and both streams. */
export function skewsmith(args: readonly string[], cwd: string, from: "build" | "source" = "build"): Promise<CliResult> {
  return new Promise((resolve) => {
    execFile(
      process.execPath,
      [from === "build" ? BIN : SOURCE, ...args],
      { cwd, encoding: "utf8", maxBuffer: 64 << 20 },
      (error, stdout, stderr) => {
        const code = error ? (typeof error.code === "number" ? error.code : -1) : 0;
        resolve({ code, stdout, stderr });
      },
    );
  });
}

/** A temporary working directory with helpers to write files into it; `remove()` deletes it. */
export function workdir() {
  const dir = mkdtempSync(join(tmpdir(), "skewsmith-cli-"));
  return {
    dir,
    path: (name: string) => join(dir, name),
    write(name: string, content: string | Uint8Array | object) {
      const data = typeof content === "string" || content instanceof Uint8Array ? content : JSON.stringify(content);
      writeFileSync(join(dir, name), data);
      return name;
    },
    run: (...args: string[]) => skewsmith(args, dir),
    runSource: (...args: string[]) => skewsmith(args, dir, "source"),
    remove: () => rmSync(dir, { recursive: true, force: true }),
  };
}
