import { EffectError } from "../effect.ts";
import { commands } from "./commands.ts";
import { processIo, UsageError, type CliIo } from "./io.ts";

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
    "Run `skewsmith <command> --help` for a command's options.",
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
    if (error instanceof RangeError || (error instanceof TypeError && "code" in error && String(error.code).startsWith("ERR_PARSE_ARGS"))) {
      io.stderr(`skewsmith ${name}: ${error.message}\n`);
      return 2;
    }
    if (error instanceof Error && "code" in error && (error.code === "ENOENT" || error.code === "EACCES" || error.code === "EISDIR")) {
      io.stderr(`skewsmith ${name}: ${error.message}\n`);
      return 2;
    }
    io.stderr(`skewsmith ${name}: ${error instanceof Error ? (error.stack ?? error.message) : String(error)}\n`);
    return 1;
  }
}
