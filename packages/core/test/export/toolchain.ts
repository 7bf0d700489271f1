import { spawnSync } from "node:child_process";
import { existsSync } from "node:fs";
import { delimiter, join } from "node:path";

/**
 * The outside tools the export tests check against, with the Debian package each comes from
 * (scripts/system-packages.txt lists them; .ci/run installs them). A missing tool fails the test, never skips it.
 */
export const TOOLS = {
  ca65: "cc65",
  ld65: "cc65",
  "m68k-linux-gnu-as": "binutils-m68k-linux-gnu",
  "m68k-linux-gnu-objcopy": "binutils-m68k-linux-gnu",
  "m68k-linux-gnu-nm": "binutils-m68k-linux-gnu",
  "arm-none-eabi-as": "binutils-arm-none-eabi",
  "arm-none-eabi-objcopy": "binutils-arm-none-eabi",
  "arm-none-eabi-nm": "binutils-arm-none-eabi",
  "z80-unknown-coff-as": "binutils-z80",
  "z80-unknown-coff-objcopy": "binutils-z80",
  "z80-unknown-coff-nm": "binutils-z80",
  gcc: "gcc",
  "g++": "g++",
  cl65: "cc65",
  sdcc: "sdcc",
  "arm-none-eabi-gcc": "gcc-arm-none-eabi",
  "m68k-linux-gnu-gcc": "gcc-m68k-linux-gnu",
  unzip: "unzip",
} as const;
export type Tool = keyof typeof TOOLS;

/** The full path of a tool on PATH; throws naming the Debian package when it is missing. */
export function toolPath(tool: Tool): string {
  for (const dir of (process.env.PATH ?? "").split(delimiter)) {
    const p = join(dir, tool);
    if (dir && existsSync(p)) return p;
  }
  throw new Error(`${tool} is not installed: the export tests need Debian package ${TOOLS[tool]} (listed in scripts/system-packages.txt)`);
}

/** Runs a tool and returns its stdout as text; throws with its output when it fails, or when it prints anything on stderr and `quiet` is asked (warnings count as failures). */
export function run(tool: Tool, args: readonly string[], cwd: string, quiet = true): string {
  const r = spawnSync(toolPath(tool), args, { cwd, encoding: "utf8", maxBuffer: 256 * 1024 * 1024 });
  if (r.error) throw r.error;
  if (r.status !== 0 || (quiet && r.stderr.trim() !== ""))
    throw new Error(`${tool} ${args.join(" ")} (exit ${r.status}):\n${r.stderr}${r.stdout}`.slice(0, 4000));
  return r.stdout;
}

/** Runs a tool and returns its stdout as bytes (for binary output such as `unzip -p`). */
export function runBytes(tool: Tool, args: readonly string[], cwd: string): Uint8Array {
  const r = spawnSync(toolPath(tool), args, { cwd, maxBuffer: 256 * 1024 * 1024 });
  if (r.error) throw r.error;
  if (r.status !== 0) throw new Error(`${tool} ${args.join(" ")} (exit ${r.status}):\n${r.stderr.toString()}`);
  return new Uint8Array(r.stdout);
}

/** Runs a compiled test program and returns its stdout. */
export function runProgram(path: string, cwd: string): string {
  const r = spawnSync(path, [], { cwd, encoding: "utf8", maxBuffer: 256 * 1024 * 1024 });
  if (r.error) throw r.error;
  if (r.status !== 0) throw new Error(`${path} (exit ${r.status}):\n${r.stderr}`);
  return r.stdout;
}

/** Symbols of an object file as `nm` lists them: name → value (offset in its section, or the constant) and size when the format has one. */
export function nmSymbols(tool: "m68k-linux-gnu-nm" | "arm-none-eabi-nm" | "z80-unknown-coff-nm", object: string, cwd: string) {
  const out = new Map<string, { value: number; size: number | null; type: string }>();
  for (const line of run(tool, ["-S", "--defined-only", object], cwd).split("\n")) {
    const m = /^([0-9a-f]+)\s+(?:([0-9a-f]+)\s+)?([A-Za-z])\s+(\S+)$/.exec(line.trim());
    if (m) out.set(m[4], { value: parseInt(m[1], 16), size: m[2] ? parseInt(m[2], 16) : null, type: m[3] });
  }
  return out;
}

/** Symbols from an ld65 VICE label file (`-Ln`): name → address. */
export function ld65Labels(text: string): Map<string, number> {
  const out = new Map<string, number>();
  for (const line of text.split("\n")) {
    const m = /^al\s+([0-9A-Fa-f]+)\s+\.(\S+)$/.exec(line.trim());
    if (m) out.set(m[2], parseInt(m[1], 16));
  }
  return out;
}
