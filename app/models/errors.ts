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
