/**
 * What the server knows about the request being handled, reachable from any code that runs for it (guards, models,
 * the error handler) without passing it around: Node's AsyncLocalStorage. The server (server/app.ts) opens one
 * context per request; outside a request (scripts, unit tests) `currentRequest()` is undefined and every user of
 * it must cope with that.
 */
import { AsyncLocalStorage } from "node:async_hooks";
import { randomFillSync } from "node:crypto";

export interface RequestInfo {
  /** Random, URL-safe id of this request: in the log line, the `X-Request-Id` header and any error shown. */
  readonly id: string;
  readonly method: string;
  /** The path, with secrets in it replaced (see `loggablePath`); never the query string. */
  readonly path: string;
  /** The client's address (the socket's, or the proxy's `X-Forwarded-For` when TRUST_PROXY says so). */
  readonly clientAddress: string;
  /** `performance.now()` when the request arrived. */
  readonly startedAt: number;
  /** The signed-in person, once a guard has looked them up. */
  userId?: string;
  /**
   * Memo of the session lookup for this request's Cookie header, so the root and the route share one lookup;
   * `claim` lets a guard that reads the person together with what it guards settle it (app/guards.server.ts).
   */
  session?: { cookie: string | null; user: Promise<unknown>; claim?: () => ((user: Promise<unknown>) => void) | null };
}

// One store for the whole process, shared by the server module and the app bundle (which may be loaded apart, as
// in development where Vite loads the app): kept on globalThis under a registered symbol.
const KEY = Symbol.for("skewsmith.requestContext");
const holder = globalThis as unknown as { [KEY]?: AsyncLocalStorage<RequestInfo> };
const storage: AsyncLocalStorage<RequestInfo> = (holder[KEY] ??= new AsyncLocalStorage<RequestInfo>());

/**
 * Random bytes for the per-request ids and nonces, drawn from a block the CSPRNG fills 256 ids at a time (as Node's
 * own randomUUID does): one call to the generator per 256 requests instead of two per request. Each byte is handed
 * out once.
 */
const pool = Buffer.alloc(4096);
let poolAt = pool.length;

/** `bytes` (at most 64) fresh random bytes as text in `encoding`. */
export function randomText(bytes: number, encoding: "base64" | "base64url"): string {
  if (!(Number.isInteger(bytes) && bytes >= 1 && bytes <= 64))
    throw new RangeError(`bytes must be a whole number from 1 to 64, not ${bytes}`);
  if (poolAt + bytes > pool.length) {
    randomFillSync(pool);
    poolAt = 0;
  }
  const text = pool.toString(encoding, poolAt, poolAt + bytes);
  poolAt += bytes;
  return text;
}

/** A new request id: 16 random bytes, base64url (22 characters). */
export function newRequestId(): string {
  return randomText(16, "base64url");
}

/** Paths whose segments carry secrets (an invitation's token), as they must appear in logs. */
const SECRET_SEGMENTS: readonly RegExp[] = [/^(\/invitations\/)[^/]+/];

/** The path as logs may show it: no query string, and secret segments replaced by "…". */
export function loggablePath(pathname: string): string {
  let out = pathname.length > 512 ? `${pathname.slice(0, 512)}…` : pathname;
  for (const pattern of SECRET_SEGMENTS) out = out.replace(pattern, "$1…");
  return out;
}

/** Runs `work` inside a new request context. */
export function runWithRequest<T>(info: RequestInfo, work: () => T): T {
  return storage.run(info, work);
}

/** The request being handled, if any. */
export function currentRequest(): RequestInfo | undefined {
  return storage.getStore();
}

/** The current request's id, or undefined outside a request. */
export function currentRequestId(): string | undefined {
  return storage.getStore()?.id;
}
