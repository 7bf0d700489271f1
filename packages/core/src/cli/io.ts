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

/**
 * Starts the diagnostics worker threads if the effect file at `path` holds a track large enough to be spread over them,
 * so that they load while the command reads, validates and compiles it. Reads the file a first time for its size only:
 * a missing file or bad JSON is left to the command's own read to report.
 */
export async function prepareDiagnostics(path: string | undefined, io: CliIo): Promise<void> {
  if (!path) return;
  const [bytes, { prepareWorkersFor }] = await Promise.all([
    io.readFile(path).catch(() => null),
    import("../diagnostics/diagnoseTrack.ts"),
  ]);
  if (bytes === null) return;
  let json: unknown;
  try {
    json = JSON.parse(new TextDecoder().decode(bytes));
  } catch {
    return;
  }
  prepareWorkersFor(json);
}

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
