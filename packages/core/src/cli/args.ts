import { parseArgs } from "node:util";
import { UsageError } from "./io.ts";

/** Options of one command, as node:util parseArgs takes them. */
type Options = Record<string, { readonly type: "string" | "boolean" }>;

/** What parseCommandArgs gives: the positional arguments and each option's value (undefined when not given). */
export interface ParsedArgs<T extends Options> {
  readonly positionals: string[];
  readonly values: { [K in keyof T]?: T[K]["type"] extends "string" ? string : boolean };
}

/**
 * Parses a command's arguments with node:util parseArgs, with two differences a person at a terminal expects: a value
 * that starts with a dash and a digit (`--frame -1`) is the option's value, so that the command can say which numbers it
 * allows, and every mistake becomes a one-line UsageError naming the option, not the parser's own advice.
 */
export function parseCommandArgs<T extends Options>(args: readonly string[], options: T): ParsedArgs<T> {
  const joined: string[] = [];
  for (let i = 0; i < args.length; i++) {
    const a = args[i];
    const name = a.startsWith("--") && !a.includes("=") ? a.slice(2) : null;
    if (name !== null && Object.hasOwn(options, name) && options[name].type === "string" && /^-\d/.test(args[i + 1] ?? "")) {
      joined.push(`${a}=${args[i + 1]}`);
      i++;
    } else joined.push(a);
  }
  try {
    return parseArgs({ args: joined, allowPositionals: true, strict: true, options }) as ParsedArgs<T>;
  } catch (error) {
    const code = error instanceof Error && "code" in error ? String(error.code) : "";
    if (!code.startsWith("ERR_PARSE_ARGS")) throw error;
    const message = (error as Error).message;
    const option = /'(-[^' <]*)/.exec(message)?.[1] ?? "";
    const known = Object.entries(options)
      .map(([n, o]) => `--${n}${o.type === "string" ? " VALUE" : ""}`)
      .join(", ");
    if (code === "ERR_PARSE_ARGS_UNKNOWN_OPTION")
      throw new UsageError(`unknown option ${option}; allowed ${known || "no options"} (--help for details)`);
    if (/argument missing|ambiguous/.test(message)) throw new UsageError(`${option}: needs a value`);
    if (/does not take an argument/.test(message)) throw new UsageError(`${option}: takes no value`);
    throw new UsageError(message.split("\n")[0]);
  }
}
