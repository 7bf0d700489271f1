import { data } from "react-router";
import type { ActionResult, FieldErrors } from "./forms.ts";
import { forbiddenMessage } from "./guards.server.ts";
import { DomainError } from "./models/errors.ts";
import { hasRole, type Role } from "./roles.ts";

/** A 400 (or other) answer with field messages for the form named by `intent`. */
export function invalid(intent: string, errors: FieldErrors, status = 400, subject?: string) {
  return data<ActionResult>({ ok: false, intent, errors, subject }, { status });
}

/** Runs a change; a broken product rule comes back as a field message with its status, anything else is thrown. */
export async function attempt(intent: string, work: () => Promise<string | void>, subject?: string) {
  try {
    const message = await work();
    return data<ActionResult>({ ok: true, intent, message: message ?? undefined, subject });
  } catch (error) {
    if (error instanceof DomainError) return invalid(intent, { [error.field ?? "form"]: error.message }, error.status, subject);
    throw error;
  }
}

/** After the guard let a member in: 403 unless their role is at least `needed` for this particular change. */
export function requireAtLeast(role: Role, needed: Role): void {
  if (!hasRole(role, needed)) throw data({ message: forbiddenMessage(role, needed) }, { status: 403 });
}

/** A 400 for a form that names no known intent. */
export function unknownIntent(intent: unknown) {
  return invalid(String(intent ?? ""), { form: `This form (“${String(intent ?? "")}”) is not known here. Reload the page and try again.` });
}
