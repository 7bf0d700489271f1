import packageJson from "../../package.json" with { type: "json" };
import { EffectError } from "../effectError.ts";
import { commands } from "./commands.ts";
import { processIo, UsageError, type CliIo } from "./io.ts";

/** The version of the package, as `skewsmith --version` prints it. */
export const VERSION: string = packageJson.version;

/** A file-system error as one plain line: the path and what is wrong with it, without the error code. */
function fileMessage(error: Error & { code?: unknown; path?: unknown }): string | null {
  const path = typeof error.path === "string" ? error.path : "the file";
  switch (error.code) {
    case "ENOENT":
      return `${path}: no such file or folder`;
    case "EACCES":
    case "EPERM":
      return `${path}: permission denied`;
    case "EISDIR":
      return `${path}: is a folder, not a file`;
    case "ENOTDIR":
      return `${path}: a part of the path is not a folder`;
    case "ENOSPC":
      return `${path}: no space left on the device`;
    default:
      return null;
  }
}

/** The top-level help text: every command with its summary. */
export function mainHelp(): string {
  const width = Math.max(...Object.keys(commands).map((n) => n.length));
  const lines = Object.entries(commands).map(([name, c]) => `  ${name.padEnd(width)}  ${c.summary}`);
  return [
    "usage: skewsmith <command> [options]",
    "",
    "Compiles rotation effects into exact three-shear shift tables and data files.",
    "",
    "commands:",
    ...lines,
    "",
    "Run `skewsmith <command> --help` for a command's options, `skewsmith --version` for the version.",
    "",
  ].join("\n");
}

/** Runs the command line `args` (without node and script) and returns the exit code: 0 ok, 1 failure, 2 bad usage or input. */
export async function main(args: string[], io: CliIo = processIo): Promise<number> {
  const [name, ...rest] = args;
  if (name === undefined) {
    // A usage error: stdout carries only a command's own output, so the help goes to stderr.
    io.stderr(mainHelp());
    return 2;
  }
  if (name === "--help" || name === "-h" || name === "help") {
    io.stdout(mainHelp());
    return 0;
  }
  if (name === "--version" || name === "-V") {
    io.stdout(`skewsmith ${VERSION}\n`);
    return 0;
  }
  const command = Object.hasOwn(commands, name) ? commands[name] : undefined;
  if (!command) {
    io.stderr(`skewsmith: unknown command "${name}"; commands: ${Object.keys(commands).join(", ")}\n`);
    return 2;
  }
  if (rest.includes("--help") || rest.includes("-h")) {
    io.stdout(command.help);
    return 0;
  }
  try {
    return await command.run(rest, io);
  } catch (error) {
    if (error instanceof UsageError || error instanceof EffectError) {
      io.stderr(`skewsmith ${name}: ${error.message}\n`);
      return 2;
    }
    if (error instanceof RangeError) {
      io.stderr(`skewsmith ${name}: ${error.message}\n`);
      return 2;
    }
    if (error instanceof TypeError && "code" in error && String(error.code).startsWith("ERR_PARSE_ARGS")) {
      // A command that parses its arguments itself (parseCommandArgs makes these plain): the parser's first line only.
      io.stderr(`skewsmith ${name}: ${error.message.split("\n")[0]}\n`);
      return 2;
    }
    const file = error instanceof Error ? fileMessage(error) : null;
    if (file !== null) {
      io.stderr(`skewsmith ${name}: ${file}\n`);
      return 2;
    }
    io.stderr(`skewsmith ${name}: ${error instanceof Error ? (error.stack ?? error.message) : String(error)}\n`);
    return 1;
  }
}
