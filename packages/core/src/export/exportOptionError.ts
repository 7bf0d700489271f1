/** Thrown for a bad export option: names the option (`field`), the value given and the allowed form. */
export class ExportOptionError extends RangeError {
  readonly field: string;
  readonly value: unknown;
  readonly allowed: string;
  /** Why the value cannot be used here, when that is more than its form (say, a table that is not antisymmetric). */
  readonly reason: string | null;
  constructor(field: string, value: unknown, allowed: string, reason?: string) {
    const shown = typeof value === "string" ? JSON.stringify(value) : value === undefined ? "nothing" : String(value);
    super(`${field}: ${shown} is not allowed${reason ? ` (${reason})` : ""}; allowed ${allowed}`);
    this.name = "ExportOptionError";
    this.field = field;
    this.value = value;
    this.allowed = allowed;
    this.reason = reason ?? null;
  }
}
