/**
 * One zod schema per form, shared by the page (field limits) and the action (validation).
 * Messages are written for the person filling the form.
 */
import { z } from "zod";
import { formShapeErrors, notText, sentTwice } from "./formShape.ts";
import { ROLES } from "./roles.ts";
import { TOKEN_SCOPES } from "./tokens.ts";

// zod compiles fast paths with `new Function` when it may; the pages' policy forbids eval, so it must not even try
// (the attempt alone is reported as a policy violation in the browser).
z.config({ jitless: true });

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

/**
 * The version of a versioned thing (team, project, effect, target profile, sprite) the form was filled from; the
 * change is refused (409) when someone saved a newer one meanwhile, so nobody overwrites another's change unseen.
 */
export const versionField = (what: string) =>
  z.coerce
    .number({ error: `The form is missing the ${what}'s version; reload the page and try again.` })
    .int(`The ${what}'s version must be a whole number; reload the page and try again.`)
    .min(1, `The ${what}'s version must be 1 or more; reload the page and try again.`)
    .max(2_147_483_647, `The ${what}'s version is out of range; reload the page and try again.`);

export const renameTeamForm = z.object({ name: name("team"), version: versionField("team") });

export const changeRoleForm = z.object({
  userId: id("member"),
  role: z.enum(ROLES, { error: `Choose a role: ${ROLES.join(", ")}.` }),
});

export const memberForm = z.object({ userId: id("member") });

export const restoreProjectForm = z.object({ projectId: id("project") });

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
  description: descriptionText(),
});

/** Editing an existing project's details: as creating one, plus the version they were read at. */
export const projectDetailsForm = projectForm.extend({ version: versionField("project") });

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

export const renameEffectForm = z.object({ effectId: id("effect"), name: name("effect"), version: versionField("effect") });

/** Copying a target profile from the team's list of profiles. */
export const duplicateProfileForm = z.object({ profileId: id("target profile") });

/** A whole number the page itself filled in (a count it showed); a reload gives a fresh one. */
const shownCount = (what: string) =>
  z
    .string({ error: `The confirmation did not say how many ${what} it showed; ask again.` })
    .regex(/^\d{1,9}$/, `The confirmation's count of ${what} is not a whole number; ask again.`)
    .transform(Number);

/** Deleting a target profile: confirmed, with the version and the number of effects the question showed. */
export const deleteProfileForm = z.object({
  confirmed: z.literal("yes", { error: "Confirm the deletion first: the page asks how many effects it detaches." }),
  version: versionField("target profile"),
  effectCount: shownCount("effects"),
});

/** The starting profiles ticked on a form (checkboxes: several values under one name), each at most once. */
const starterKeys = (required: boolean) =>
  z
    .array(z.string(), { error: "Tick at least one starting profile to add." })
    .min(required ? 1 : 0, "Tick at least one starting profile to add.")
    .refine((keys) => new Set(keys).size === keys.length, "The form sent the same starting profile twice; tick each one once.");

/** Adding starting profiles to a team; which keys exist is checked where they are added (addStarterProfiles). */
export const addStartersForm = z.object({ starter: starterKeys(true) });

/** The starting profiles a new team begins with (none ticked: none). */
export const newTeamStartersForm = z.object({ starter: starterKeys(false).default([]) });

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
export { formShapeErrors };

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

/** True when a schema field takes a list (several values under one name, such as checkboxes). */
function takesList(field: z.ZodType): boolean {
  let t: z.ZodType | undefined = field;
  for (let depth = 0; t && depth < 8; depth++) {
    const def = t._zod.def as { type: string; innerType?: z.ZodType; in?: z.ZodType };
    if (def.type === "array") return true;
    t = def.innerType ?? def.in;
  }
  return false;
}

/**
 * Parses a submitted form with a schema: the data, or the field messages to show. Only the schema's own fields
 * are read; a file where text belongs, or a field sent twice that takes one value, is a field message too (never
 * silently the first or the last one).
 */
export function parseForm<S extends z.ZodType>(
  schema: S,
  form: FormData,
): { ok: true; data: z.output<S> } | { ok: false; errors: FieldErrors } {
  const shape = schema instanceof z.ZodObject ? (schema.shape as Record<string, z.ZodType>) : null;
  // A null-prototype record: a field called "__proto__" or "constructor" is just a field.
  const values: Record<string, unknown> = Object.create(null);
  const problems: FieldErrors = {};
  for (const key of new Set(form.keys())) {
    if (shape && !Object.hasOwn(shape, key)) continue;
    const all = form.getAll(key);
    if (all.some((v) => typeof v !== "string")) problems[key] = notText(key);
    else if (shape && takesList(shape[key])) values[key] = all;
    else if (all.length > 1) problems[key] = sentTwice(key, all.length);
    else values[key] = all[0];
  }
  const result = schema.safeParse(values);
  if (Object.keys(problems).length > 0) return { ok: false, errors: { ...(result.success ? {} : fieldErrors(result.error)), ...problems } };
  return result.success ? { ok: true, data: result.data } : { ok: false, errors: fieldErrors(result.error) };
}
