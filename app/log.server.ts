/**
 * Structured logs: one JSON object per line on standard output, so any log collector can index them. Every line
 * made while a request is handled carries that request's id (from the request context), so the access line and
 * an error's stack can be found together.
 */
import { currentRequest } from "./requestContext.server.ts";

export type LogLevel = "debug" | "info" | "warn" | "error";

/** Where lines go; tests may swap it to capture them. */
let sink: (line: string) => void = (line) => process.stdout.write(`${line}\n`);

/** Replaces the output of the log (tests); returns a function that puts the old one back. */
export function captureLog(into: (line: string) => void): () => void {
  const before = sink;
  sink = into;
  return () => {
    sink = before;
  };
}

/** Writes one log line: time, level, message, the current request id (when there is one) and `fields`. */
export function log(level: LogLevel, msg: string, fields: Record<string, unknown> = {}): void {
  const request = currentRequest();
  const entry: Record<string, unknown> = { time: new Date().toISOString(), level, msg };
  if (request && fields.requestId === undefined) entry.requestId = request.id;
  Object.assign(entry, fields);
  let line: string;
  try {
    line = JSON.stringify(entry);
  } catch {
    line = JSON.stringify({ time: entry.time, level, msg, requestId: entry.requestId, note: "fields could not be serialised" });
  }
  sink(line);
}

/** The parts of an error worth logging: name, message, code, stack, and its cause's (one level). */
export function describeError(error: unknown): Record<string, unknown> {
  if (!(error instanceof Error)) return { message: String(error) };
  const e = error as Error & { code?: unknown; cause?: unknown };
  const out: Record<string, unknown> = { name: e.name, message: e.message, stack: e.stack };
  if (e.code !== undefined) out.code = e.code;
  if (e.cause !== undefined) {
    const cause = e.cause as Error & { code?: unknown };
    out.cause = cause instanceof Error ? { name: cause.name, message: cause.message, code: cause.code, stack: cause.stack } : String(cause);
  }
  return out;
}

/** Logs an unexpected error with its stack, under the current request's id. */
export function logError(msg: string, error: unknown, fields: Record<string, unknown> = {}): void {
  log("error", msg, { ...fields, error: describeError(error) });
}
