/**
 * One zod schema per form, shared by the page (field limits) and the action (validation).
 * Messages are written for the person filling the form.
 */
import { z } from "zod";
import { ROLES } from "./roles.ts";
import { TOKEN_SCOPES } from "./tokens.ts";

export const NAME_MAX = 80;
export const DESCRIPTION_MAX = 2000;

/** C0 and C1 control characters and DEL: never allowed in a name. */
export const CONTROL = /[\u0000-\u001f\u007f-\u009f]/;
/** The same, but a description may hold tabs and line breaks. */
const CONTROL_IN_TEXT = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f-\u009f]/;
/** Bidirectional embeddings, overrides, isolates and marks: they can make a name read as something else. */
export const BIDI = /[\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069]/;

/**
 * The one text rule for every name (teams, projects, effects, sprites, target profiles, tokens): trimmed, 1 to
 * NAME_MAX characters, no control characters, no bidirectional controls.
 */
export const nameText = (what: string, max = NAME_MAX) =>
  z
    .string({ error: `Give the ${what} a name.` })
    .trim()
    .min(1, `Give the ${what} a name.`)
    .max(max, `Keep the ${what} name to ${max} characters or fewer.`)
    .refine((v) => !CONTROL.test(v), "Names cannot contain control characters (such as NUL, tab or a line break).")
    .refine((v) => !BIDI.test(v), "Names cannot contain bidirectional control characters (they can disguise a name).");

/** The one text rule for every description: trimmed, at most `max` characters, line breaks and tabs allowed, no other controls. */
export const descriptionText = (max = DESCRIPTION_MAX) =>
  z
    .string({ error: "The description must be text." })
    .trim()
    .max(max, `Keep the description to ${max} characters or fewer.`)
    .refine((v) => !CONTROL_IN_TEXT.test(v), "The description cannot contain control characters other than tabs and line breaks.")
    .default("");

const name = nameText;

const id = (what: string) => z.string({ error: `Choose a ${what}.` }).uuid(`That ${what} does not exist.`);

export const createTeamForm = z.object({ name: name("team") });

export const renameTeamForm = z.object({ name: name("team") });

export const changeRoleForm = z.object({
  userId: id("member"),
  role: z.enum(ROLES, { error: `Choose a role: ${ROLES.join(", ")}.` }),
});

export const memberForm = z.object({ userId: id("member") });

/** Longest e-mail address accepted, in characters (RFC 5321 §4.5.3.1.3 limits a path to 256 octets, brackets included; from memory). */
export const EMAIL_MAX = 254;

export const inviteForm = z.object({
  email: z
    .string({ error: "Give the e-mail address to invite." })
    .trim()
    .min(1, "Give the e-mail address to invite.")
    .max(EMAIL_MAX, `An e-mail address has at most ${EMAIL_MAX} characters.`)
    .pipe(z.email("That is not an e-mail address (say, name@example.com).")),
  role: z.enum(ROLES, { error: `Choose a role: ${ROLES.join(", ")}.` }),
});

export const invitationForm = z.object({ invitationId: id("invitation") });

export const projectForm = z.object({
  name: name("project"),
  description: z.string().trim().max(DESCRIPTION_MAX, `Keep the description to ${DESCRIPTION_MAX} characters or fewer.`).default(""),
});

export const createEffectForm = z.object({
  name: name("effect"),
  /** Empty means "the effect keeps its own settings". */
  targetProfileId: z
    .string()
    .optional()
    .transform((v) => (v ? v : undefined))
    .pipe(id("target profile").optional()),
});

export const effectForm = z.object({ effectId: id("effect") });

export const renameEffectForm = z.object({ effectId: id("effect"), name: name("effect") });

/** How long a new API token may last, in days; null means until revoked. */
export const TOKEN_LIFETIMES = [7, 30, 90, 365] as const;
export const DEFAULT_TOKEN_LIFETIME = 90;

/** A new API token: a name, a scope, and how many days it lasts (empty or "never": until revoked). Shared by the settings page and `POST /api/v1/tokens`. */
export const createTokenForm = z.object({
  name: name("token"),
  scope: z.enum(TOKEN_SCOPES, { error: `Choose a scope: ${TOKEN_SCOPES.map((s) => `“${s}”`).join(" or ")}.` }),
  expiresInDays: z
    .preprocess(
      (v) => (v === "" || v === "never" || v === null ? null : typeof v === "string" && /^\d+$/.test(v) ? Number(v) : v),
      z
        .number({ error: `Choose how long the token lasts: ${TOKEN_LIFETIMES.join(", ")} days, or never (until revoked).` })
        .refine((d) => (TOKEN_LIFETIMES as readonly number[]).includes(d), {
          error: `Choose how long the token lasts: ${TOKEN_LIFETIMES.join(", ")} days, or never (until revoked).`,
        })
        .nullable(),
    )
    .default(DEFAULT_TOKEN_LIFETIME),
});

export const revokeTokenForm = z.object({ tokenId: id("token") });

/** Field messages of a failed parse, one string per field (the first problem found). */
export type FieldErrors = Record<string, string>;

export function fieldErrors(error: z.ZodError): FieldErrors {
  const out: FieldErrors = {};
  for (const issue of error.issues) {
    const key = issue.path.join(".") || "form";
    out[key] ??= issue.message;
  }
  return out;
}

/** What an action answers when it does not redirect: which form it was, and the field messages if it failed. */
export type ActionResult =
  { ok: true; intent: string; message?: string; subject?: string } | { ok: false; intent: string; errors: FieldErrors; subject?: string };

/** The field messages an action sent back for the form `intent` (and, when given, the row `subject`), if any. */
export function errorsFor(actionData: ActionResult | undefined, intent: string, subject?: string): FieldErrors | undefined {
  if (!actionData || actionData.ok || actionData.intent !== intent) return undefined;
  if (subject !== undefined && actionData.subject !== subject) return undefined;
  return actionData.errors;
}

/** Parses a submitted form with a schema: the data, or the field messages to show. */
export function parseForm<S extends z.ZodType>(
  schema: S,
  form: FormData,
): { ok: true; data: z.output<S> } | { ok: false; errors: FieldErrors } {
  const values: Record<string, unknown> = {};
  for (const [key, value] of form.entries()) if (typeof value === "string") values[key] = value;
  const result = schema.safeParse(values);
  return result.success ? { ok: true, data: result.data } : { ok: false, errors: fieldErrors(result.error) };
}
