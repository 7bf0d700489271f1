/** A rule of the product was broken (a name taken, the last owner leaving…): shown to the person, next to `field` when given. */
export class DomainError extends Error {
  readonly field: string | undefined;
  readonly status: 400 | 404 | 409;
  constructor(message: string, options: { field?: string; status?: 400 | 404 | 409 } = {}) {
    super(message);
    this.name = "DomainError";
    this.field = options.field;
    this.status = options.status ?? 400;
  }
}

/** True when a PostgreSQL error is a unique violation (SQLSTATE 23505), optionally on the named constraint or index. */
export function isUniqueViolation(error: unknown, constraint?: string): boolean {
  const e = (error as { cause?: unknown })?.cause ?? error;
  const pg = e as { code?: string; constraint?: string };
  return pg?.code === "23505" && (constraint === undefined || pg.constraint === constraint);
}

/** Node socket errors and SQLSTATEs that mean the database cannot be reached right now (not a bad query). */
const UNREACHABLE_CODES = new Set([
  "ECONNREFUSED",
  "ECONNRESET",
  "ETIMEDOUT",
  "EPIPE",
  "ENOTFOUND",
  "EHOSTUNREACH",
  "57P01",
  "57P02",
  "57P03",
]);
const UNREACHABLE_MESSAGES =
  /Connection terminated|timeout exceeded when trying to connect|not queryable|Connection ended unexpectedly|the database system is (starting up|shutting down)/i;

/** True when an error (or its cause) says PostgreSQL is down or unreachable: a 503, not a bug. */
export function isDatabaseUnavailable(error: unknown): boolean {
  for (let e = error, depth = 0; e && depth < 4; e = (e as { cause?: unknown }).cause, depth++) {
    const { code, message } = e as { code?: unknown; message?: unknown };
    if (typeof code === "string" && (UNREACHABLE_CODES.has(code) || code.startsWith("08"))) return true;
    if (typeof message === "string" && UNREACHABLE_MESSAGES.test(message)) return true;
    const errors = (e as { errors?: unknown }).errors; // AggregateError of a failed connect to several addresses
    if (Array.isArray(errors) && errors.some((inner) => isDatabaseUnavailable(inner))) return true;
  }
  return false;
}

/**
 * The 409 for a change made from an old copy: someone saved `what` since the person opened it. Nothing is
 * overwritten unseen; the message says what the thing is now and what to do.
 */
export function staleVersion(what: string, current: { version: number; name?: string }, expected: number, field = "form"): DomainError {
  const now = current.name === undefined ? `version ${current.version}` : `“${current.name}”, version ${current.version}`;
  return new DomainError(
    `Someone changed this ${what} after you opened it (it is now ${now}; you started from version ${expected}). Reload to see their change, then try again.`,
    { field, status: 409 },
  );
}
