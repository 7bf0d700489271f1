import { execFile } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";

/** The real `skewsmith` binary of this package. */
const BIN = fileURLToPath(new URL("../../bin/skewsmith.mjs", import.meta.url));

export interface CliResult {
  readonly code: number;
  readonly stdout: string;
  readonly stderr: string;
}

/** Runs `node bin/skewsmith.mjs …args` in `cwd` and collects its exit code and both streams. */
export function skewsmith(args: readonly string[], cwd: string): Promise<CliResult> {
  return new Promise((resolve) => {
    execFile(process.execPath, [BIN, ...args], { cwd, encoding: "utf8", maxBuffer: 64 << 20 }, (error, stdout, stderr) => {
      const code = error ? (typeof error.code === "number" ? error.code : -1) : 0;
      resolve({ code, stdout, stderr });
    });
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
    remove: () => rmSync(dir, { recursive: true, force: true }),
  };
}
