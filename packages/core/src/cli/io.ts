import { readFile, writeFile } from "node:fs/promises";

/** Where a command writes: stdout for its own output only, stderr for messages and errors. */
export interface CliIo {
  readonly stdout: (text: string) => void;
  readonly stderr: (text: string) => void;
  readonly readFile: (path: string) => Promise<Uint8Array>;
  readonly writeFile: (path: string, data: Uint8Array | string) => Promise<void>;
}

/** The process's own streams and file system. */
export const processIo: CliIo = {
  stdout: (text) => process.stdout.write(text),
  stderr: (text) => process.stderr.write(text),
  readFile: async (path) => new Uint8Array(await readFile(path)),
  writeFile: (path, data) => writeFile(path, data),
};

/** A mistake in how a command was called or in its input: printed as `skewsmith: <message>`, exit code 2. */
export class UsageError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "UsageError";
  }
}

/** One subcommand: its one-line summary, its --help text, and what it does. Returns the exit code. */
export interface Command {
  readonly summary: string;
  readonly help: string;
  readonly run: (args: string[], io: CliIo) => Promise<number>;
}
