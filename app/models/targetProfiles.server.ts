import { decodePng, EffectError, ExportOptionError, resolveExportOptions, type Effect, type ExportOptionsInput } from "@skewsmith/core";
import { and, asc, count, eq, inArray, isNull, sql } from "drizzle-orm";
import type { z } from "zod";
import { preparedOnce, type Tx } from "../db/client.server.ts";
import {
  effectProfileChanges,
  effects,
  projects,
  sprites,
  targetProfiles,
  type EffectRow,
  type ProfileFieldChange,
  type TargetProfile,
} from "../db/schema.ts";
import { newEffectDocument, targetProfileInput, type TargetProfileInput } from "../effects/settings.ts";
import { exportDefaultsForProfile } from "../exports/defaults.ts";
import { fieldErrors, NAME_MAX } from "../forms.ts";
import { applyProfileToDocument, exportChanges, settingsChanges } from "../profiles/apply.ts";
import { starterProfile } from "../profiles/starters.ts";
import { SPRITE_COLOURS, spriteColours } from "../sprites/colours.ts";
import { recordActivity } from "./activity.server.ts";
import { validDocument } from "./effects.server.ts";
import { DomainError, isUniqueViolation } from "./errors.ts";

/** A target profile as a caller gives it (form values or plain data): anything, field by field, until checkProfileInput has checked it. */
export type ProfileInput = Partial<Record<keyof z.input<typeof targetProfileInput>, unknown>>;

const DOCUMENT_TO_FIELD: Record<string, string> = {
  "canvas.width": "canvasWidth",
  "canvas.height": "canvasHeight",
  "fixedPoint.bits": "fixedPointBits",
  "fixedPoint.fraction": "fixedPointFraction",
  rounding: "rounding",
  halfTurn: "halfTurn",
  edges: "edges",
  columnGroup: "columnGroup",
};

const FIELD_LABEL: Record<string, string> = {
  canvasWidth: "Canvas width",
  canvasHeight: "Canvas height",
  fixedPointBits: "Bits",
  fixedPointFraction: "Fraction bits",
  columnGroup: "Column group",
  dialects: "Export dialects",
  labelPrefix: "Label prefix",
  sign: "Sign",
  registerBits: "Register width",
  element: "Element type",
  split: "Split",
  half: "Half tables",
  dedupe: "Dedupe",
};

/** Core's export option names, as the profile form names them. */
const EXPORT_TO_FIELD: Record<string, string> = { outputs: "dialects", label: "labelPrefix" };

/**
 * Checks a target profile: the field rules (names, ranges), then core: the settings must make a valid effect
 * (parseEffect) and the export settings must pass resolveExportOptions. Throws a DomainError naming the form field.
 */
export function checkProfileInput(input: unknown): TargetProfileInput {
  const parsed = targetProfileInput.safeParse(input);
  if (!parsed.success) {
    const [path, message] = Object.entries(fieldErrors(parsed.error))[0];
    // The form's field: "exportOptions.sign" is the form's "sign", "dialects.2" its "dialects".
    const [head, next] = path.split(".");
    throw new DomainError(message, { field: head === "exportOptions" && next ? next : head });
  }
  const settings = parsed.data;
  try {
    newEffectDocument(settings);
  } catch (error) {
    if (error instanceof EffectError) {
      // Name the form field behind the first document field core refused.
      const issue = error.issues[0];
      const field = DOCUMENT_TO_FIELD[issue.path];
      throw new DomainError(`${(field && FIELD_LABEL[field]) ?? issue.path}: ${issue.message}`, { field });
    }
    throw error;
  }
  try {
    resolveExportOptions({
      ...(settings.exportOptions as ExportOptionsInput),
      ...(settings.dialects.length ? { outputs: settings.dialects } : {}),
      ...(settings.labelPrefix ? { label: settings.labelPrefix } : {}),
    });
  } catch (error) {
    if (error instanceof ExportOptionError) {
      const field = Object.hasOwn(EXPORT_TO_FIELD, error.field) ? EXPORT_TO_FIELD[error.field] : error.field;
      throw new DomainError(`${FIELD_LABEL[field] ?? field}: ${error.message}`, { field });
    }
    throw error;
  }
  return settings;
}

function nameTaken(name: string) {
  return new DomainError(`The team already has a target profile called “${name}”. Choose another name.`, { field: "name", status: 409 });
}

async function guardName<T>(name: string, work: () => Promise<T>): Promise<T> {
  try {
    return await work();
  } catch (error) {
    if (isUniqueViolation(error, "target_profiles_team_name_key")) throw nameTaken(name);
    throw error;
  }
}

/** Creates a target profile for a team; its settings must make a valid effect (checked by core). */
export async function createTargetProfile(
  db: Tx,
  input: { teamId: string; actorId: string | null } & ProfileInput,
): Promise<TargetProfile> {
  const settings = checkProfileInput(input);
  return guardName(settings.name, () =>
    db.transaction(async (tx) => {
      const [profile] = await tx
        .insert(targetProfiles)
        .values({ teamId: input.teamId, ...settings })
        .returning();
      await recordActivity(tx, {
        teamId: input.teamId,
        userId: input.actorId,
        action: "target_profile.created",
        summary: `created the target profile ${settings.name}`,
      });
      return profile;
    }),
  );
}

export async function getTargetProfile(db: Tx, profileId: string): Promise<TargetProfile | null> {
  const [profile] = await db.select().from(targetProfiles).where(eq(targetProfiles.id, profileId));
  return profile ?? null;
}

/** The team's target profile with this id, or null (a profile of another team counts as missing). */
export async function getTeamProfile(db: Tx, teamId: string, profileId: string): Promise<TargetProfile | null> {
  const [profile] = await db
    .select()
    .from(targetProfiles)
    .where(and(eq(targetProfiles.id, profileId), eq(targetProfiles.teamId, teamId)));
  return profile ?? null;
}

async function lockTeamProfile(tx: Tx, teamId: string, profileId: string): Promise<TargetProfile> {
  const [profile] = await tx
    .select()
    .from(targetProfiles)
    .where(and(eq(targetProfiles.id, profileId), eq(targetProfiles.teamId, teamId)))
    .for("update");
  if (!profile) throw new DomainError("That target profile does not exist in this team (it may have been deleted).", { status: 404 });
  return profile;
}

function stale(what: string, now: number, started: number) {
  return new DomainError(
    `Someone changed this ${what} after you opened it (now version ${now}, you started from version ${started}). Nothing was saved: reload to see their changes, then make yours again.`,
    { status: 409 },
  );
}

export interface TargetProfileListItem extends TargetProfile {
  /** Live effects using the profile, in the project asked about (or the whole team). */
  effectCount: number;
}

/** A team's target profiles, by name, with how many live effects use each (in one project when given). */
export async function listTargetProfiles(db: Tx, teamId: string, projectId?: string): Promise<TargetProfileListItem[]> {
  const name = projectId ? "skewsmith_profiles_of_project" : "skewsmith_profiles_of_team";
  const query = preparedOnce(db, name, (d) => {
    const used = projectId
      ? sql<number>`(select count(*)::int from ${effects} e where e.target_profile_id = "target_profiles"."id" and e.deleted_at is null and e.project_id = ${sql.placeholder("projectId")})`
      : sql<number>`(select count(*)::int from ${effects} e join ${projects} p on p.id = e.project_id where e.target_profile_id = "target_profiles"."id" and e.deleted_at is null and p.archived_at is null)`;
    return d
      .select({ profile: targetProfiles, effectCount: used })
      .from(targetProfiles)
      .where(eq(targetProfiles.teamId, sql.placeholder("teamId")))
      .orderBy(asc(sql`lower(${targetProfiles.name})`))
      .prepare(name);
  });
  const rows = await query.execute(projectId ? { teamId, projectId } : { teamId });
  return rows.map((r) => ({ ...r.profile, effectCount: r.effectCount }));
}

export interface ProfileEffect {
  id: string;
  name: string;
  version: number;
  followsProfile: boolean;
  projectId: string;
  projectName: string;
  projectArchived: boolean;
}

/** The live effects that use a profile (following it or detached), by project and name. */
export async function listProfileEffects(db: Tx, profileId: string): Promise<ProfileEffect[]> {
  const rows = await db
    .select({
      id: effects.id,
      name: effects.name,
      version: effects.version,
      followsProfile: effects.followsProfile,
      projectId: projects.id,
      projectName: projects.name,
      archivedAt: projects.archivedAt,
    })
    .from(effects)
    .innerJoin(projects, eq(projects.id, effects.projectId))
    .where(and(eq(effects.targetProfileId, profileId), isNull(effects.deletedAt)))
    .orderBy(asc(sql`lower(${projects.name})`), asc(sql`lower(${effects.name})`));
  return rows.map(({ archivedAt, ...r }) => ({ ...r, projectArchived: archivedAt !== null }));
}

/** Every effect row that names the profile (deleted ones and those in archived projects too): what deleting it detaches. */
export async function countProfileUsers(db: Tx, profileId: string): Promise<number> {
  const [row] = await db.select({ n: count() }).from(effects).where(eq(effects.targetProfileId, profileId));
  return row.n;
}

/** Replaces the effect's record of the last profile change that reached it. */
async function noteProfileChange(
  tx: Tx,
  entry: { effectId: string; profile: TargetProfile | null; profileName: string; profileVersion: number; effectVersion: number },
  changes: ProfileFieldChange[],
  actorId: string | null,
): Promise<void> {
  const values = {
    effectId: entry.effectId,
    targetProfileId: entry.profile?.id ?? null,
    profileName: entry.profileName,
    profileVersion: entry.profileVersion,
    effectVersion: entry.effectVersion,
    changes,
    changedBy: actorId,
    changedAt: new Date(),
  };
  await tx
    .insert(effectProfileChanges)
    .values(values)
    .onConflictDoUpdate({ target: effectProfileChanges.effectId, set: { ...values, updatedAt: new Date() } });
}

/** The document of a following effect under `profile`; a DomainError naming the effect if core refuses the result. */
function followingDocument(effect: EffectRow, profile: TargetProfile): { document: Effect; changes: ProfileFieldChange[] } {
  try {
    return applyProfileToDocument(validDocument(effect.document), profile);
  } catch (error) {
    const detail = error instanceof EffectError ? error.issues.map((i) => `${i.path}: ${i.message}`).join("; ") : (error as Error).message;
    throw new DomainError(`The effect “${effect.name}” follows this profile and would not be valid with these settings (${detail}).`, {
      status: 409,
    });
  }
}

export interface ProfileUpdate {
  profile: TargetProfile;
  /** Following effects whose document changed (each one's version went up by one). */
  effectsUpdated: number;
  /** What changed in the profile itself. */
  changes: ProfileFieldChange[];
}

/**
 * Saves a target profile if nobody changed it since `expectedVersion` (else 409, nothing written), and in the same
 * transaction lets the change flow into the effects that follow it: each document is rebuilt from the new settings,
 * validated by core and saved with its version bumped, so a bench save that started from the old version gets a 409.
 * Every effect the change reaches (following ones; detached ones for export settings only) records what changed.
 */
export async function updateTargetProfile(
  db: Tx,
  input: { teamId: string; profileId: string; expectedVersion: number; actorId: string } & ProfileInput,
): Promise<ProfileUpdate> {
  const settings = checkProfileInput(input);
  return guardName(settings.name, () =>
    db.transaction(async (tx) => {
      const before = await lockTeamProfile(tx, input.teamId, input.profileId);
      if (before.version !== input.expectedVersion) throw stale("target profile", before.version, input.expectedVersion);
      const [after] = await tx
        .update(targetProfiles)
        .set({ ...settings, version: sql`${targetProfiles.version} + 1` })
        .where(eq(targetProfiles.id, before.id))
        .returning();
      const documentChanges = settingsChanges(before, after);
      const exportChange = exportChanges(before, after);
      const changes = [
        ...(before.name !== after.name ? [{ field: "name", label: "Name", from: before.name, to: after.name }] : []),
        ...(before.maxColours !== after.maxColours
          ? [
              {
                field: "maxColours",
                label: "Colour limit",
                from: String(before.maxColours ?? "none"),
                to: String(after.maxColours ?? "none"),
              },
            ]
          : []),
        ...documentChanges,
        ...exportChange,
      ];

      // Lock every effect that uses the profile, in one order, before changing any of them.
      const using = await tx.select().from(effects).where(eq(effects.targetProfileId, before.id)).orderBy(asc(effects.id)).for("update");
      if (after.maxColours !== null && (before.maxColours === null || after.maxColours < before.maxColours))
        await checkLoweredLimit(tx, after.maxColours, using);
      let effectsUpdated = 0;
      for (const effect of using) {
        let reached: ProfileFieldChange[] = [];
        let effectVersion = effect.version;
        if (effect.followsProfile && documentChanges.length > 0) {
          const next = followingDocument(effect, after);
          if (next.changes.length > 0) {
            const [saved] = await tx
              .update(effects)
              .set({ document: next.document, version: sql`${effects.version} + 1`, updatedBy: input.actorId })
              .where(eq(effects.id, effect.id))
              .returning({ version: effects.version });
            effectVersion = saved.version;
            effectsUpdated += 1;
            reached = next.changes;
          }
        }
        reached = [...reached, ...exportChange];
        if (reached.length > 0)
          await noteProfileChange(
            tx,
            { effectId: effect.id, profile: after, profileName: after.name, profileVersion: after.version, effectVersion },
            reached,
            input.actorId,
          );
      }
      if (changes.length > 0) {
        const what = changes.map((c) => `${c.label.toLowerCase()} ${c.from} → ${c.to}`).join(", ");
        const flowed = effectsUpdated > 0 ? `; ${effectsUpdated} following effect${effectsUpdated === 1 ? "" : "s"} updated` : "";
        await recordActivity(tx, {
          teamId: input.teamId,
          userId: input.actorId,
          action: "target_profile.changed",
          summary: `changed the target profile ${after.name} (${what})${flowed}`.slice(0, 1000),
        });
      }
      return { profile: after, effectsUpdated, changes };
    }),
  );
}

/**
 * Refuses a colour limit below what a sprite of an effect using the profile needs (deleted effects are not checked:
 * they are restored as they are then), naming the field, the sprite, the effect and the limits still allowed.
 */
async function checkLoweredLimit(tx: Tx, limit: number, using: (typeof effects.$inferSelect)[]): Promise<void> {
  const live = using.filter((e) => e.deletedAt === null && e.spriteId !== null);
  const spriteIds = [...new Set(live.map((e) => e.spriteId!))];
  if (spriteIds.length === 0) return;
  const rows = await tx
    .select({ id: sprites.id, name: sprites.name, png: sprites.png })
    .from(sprites)
    .where(inArray(sprites.id, spriteIds));
  let worst: { colours: number; sprite: string; effect: string } | null = null;
  for (const row of rows) {
    const colours = spriteColours(decodePng(row.png));
    if (colours > limit && (!worst || colours > worst.colours))
      worst = { colours, sprite: row.name, effect: live.find((e) => e.spriteId === row.id)!.name };
  }
  if (worst)
    throw new DomainError(
      `Colour limit ${limit} is below the ${worst.colours} colours (the background included) of the sprite ${worst.sprite}, which the effect ${worst.effect} uses with this profile: allowed ${worst.colours} to ${SPRITE_COLOURS.max} while it does, or none. Reduce the sprite's colours first.`,
      // 400, not 409: the form reads a 409 as someone else's newer version.
      { field: "maxColours" },
    );
}

/** The first free "<name> copy", "<name> copy 2", … among the team's profiles. */
async function copyName(db: Tx, teamId: string, name: string): Promise<string> {
  const rows = await db.select({ name: targetProfiles.name }).from(targetProfiles).where(eq(targetProfiles.teamId, teamId));
  const taken = new Set(rows.map((r) => r.name.toLowerCase()));
  const stem = `${name.slice(0, NAME_MAX - 8)} copy`;
  let candidate = stem;
  for (let n = 2; taken.has(candidate.toLowerCase()); n++) candidate = `${stem} ${n}`;
  return candidate;
}

/** Copies a profile's settings under a new name ("<name> copy"); no effect uses the copy yet. */
export async function duplicateTargetProfile(
  db: Tx,
  input: { teamId: string; profileId: string; actorId: string },
): Promise<TargetProfile> {
  return db.transaction(async (tx) => {
    const source = await lockTeamProfile(tx, input.teamId, input.profileId);
    const name = await copyName(tx, input.teamId, source.name);
    const { id: _id, createdAt: _c, updatedAt: _u, version: _v, ...settings } = source;
    const [copy] = await tx
      .insert(targetProfiles)
      .values({ ...settings, name })
      .returning();
    await recordActivity(tx, {
      teamId: input.teamId,
      userId: input.actorId,
      action: "target_profile.duplicated",
      summary: `duplicated the target profile ${source.name} as ${name}`,
    });
    return copy;
  });
}

/**
 * Deletes a profile after the person confirmed how many effects use it: each of those effects is detached and keeps
 * its settings (its document is not touched) and records that its profile went. Refused (409) when the profile
 * changed or more or fewer effects use it than the person was shown.
 */
export async function deleteTargetProfile(
  db: Tx,
  input: { teamId: string; profileId: string; expectedVersion: number; expectedEffectCount: number; actorId: string },
): Promise<{ detached: number }> {
  return db.transaction(async (tx) => {
    const profile = await lockTeamProfile(tx, input.teamId, input.profileId);
    if (profile.version !== input.expectedVersion) throw stale("target profile", profile.version, input.expectedVersion);
    const using = await tx.select().from(effects).where(eq(effects.targetProfileId, profile.id)).orderBy(asc(effects.id)).for("update");
    if (using.length !== input.expectedEffectCount)
      throw new DomainError(
        `${using.length} effect${using.length === 1 ? " uses" : "s use"} this profile now, not the ${input.expectedEffectCount} you confirmed. Nothing was deleted: look again and confirm.`,
        { status: 409 },
      );
    if (using.length > 0) {
      await tx
        .update(effects)
        .set({ followsProfile: false, targetProfileId: null, updatedBy: input.actorId })
        .where(
          inArray(
            effects.id,
            using.map((e) => e.id),
          ),
        );
      for (const effect of using)
        await noteProfileChange(
          tx,
          { effectId: effect.id, profile: null, profileName: profile.name, profileVersion: profile.version, effectVersion: effect.version },
          [{ field: "profile", label: "Target profile", from: profile.name, to: "deleted: the effect keeps its own settings" }],
          input.actorId,
        );
    }
    await tx.delete(targetProfiles).where(eq(targetProfiles.id, profile.id));
    await recordActivity(tx, {
      teamId: input.teamId,
      userId: input.actorId,
      action: "target_profile.deleted",
      summary:
        `deleted the target profile ${profile.name}` +
        (using.length ? `; ${using.length} effect${using.length === 1 ? "" : "s"} detached, keeping their settings` : ""),
    });
    return { detached: using.length };
  });
}

/** Adds the chosen starting profiles (by key) to a team, skipping any whose name the team already uses; returns the names added. */
export async function addStarterProfiles(db: Tx, input: { teamId: string; keys: readonly string[]; actorId: string }): Promise<string[]> {
  const unknown = input.keys.find((k) => !starterProfile(k));
  if (unknown !== undefined) throw new DomainError(`There is no starting profile “${unknown}”.`, { field: "starter" });
  return db.transaction(async (tx) => {
    const existing = new Set(
      (await tx.select({ name: targetProfiles.name }).from(targetProfiles).where(eq(targetProfiles.teamId, input.teamId))).map((r) =>
        r.name.toLowerCase(),
      ),
    );
    const added: string[] = [];
    for (const key of new Set(input.keys)) {
      const { settings } = starterProfile(key)!;
      if (existing.has(settings.name.toLowerCase())) continue;
      await createTargetProfile(tx, { ...settings, teamId: input.teamId, actorId: input.actorId });
      added.push(settings.name);
    }
    return added;
  });
}

/** An effect of the team's, locked for the change, with its project; 404 when it is not there or deleted. */
async function lockEffect(tx: Tx, effectId: string) {
  const [row] = await tx
    .select({ effect: effects, teamId: projects.teamId, archivedAt: projects.archivedAt })
    .from(effects)
    .innerJoin(projects, eq(projects.id, effects.projectId))
    .where(eq(effects.id, effectId))
    .for("update", { of: effects });
  if (!row || row.effect.deletedAt) throw new DomainError("That effect does not exist (or was deleted).", { status: 404 });
  if (row.archivedAt) throw new DomainError("The project is archived; restore it before changing its effects.", { status: 409 });
  return row;
}

/** Stops an effect from following its profile: it keeps its settings, and later profile changes no longer reach its document. */
export async function detachEffect(db: Tx, input: { effectId: string; actorId: string }): Promise<void> {
  await db.transaction(async (tx) => {
    const { effect, teamId } = await lockEffect(tx, input.effectId);
    if (!effect.followsProfile || !effect.targetProfileId) return;
    const profile = await getTargetProfile(tx, effect.targetProfileId);
    await tx.update(effects).set({ followsProfile: false, updatedBy: input.actorId }).where(eq(effects.id, effect.id));
    await recordActivity(tx, {
      teamId,
      projectId: effect.projectId,
      userId: input.actorId,
      action: "effect.detached",
      summary: `detached the effect ${effect.name} from the target profile ${profile?.name ?? "(deleted)"}`,
    });
  });
}

/**
 * Makes an effect follow a profile of its team (the profile's settings replace its own, validated by core, version
 * bumped), if nobody saved the effect since `expectedVersion`.
 */
export async function followProfile(
  db: Tx,
  input: { effectId: string; profileId: string; expectedVersion: number; actorId: string },
): Promise<EffectRow> {
  return db.transaction(async (tx) => {
    // Profile first (shared), then the effect: the same order as a profile change, so the two never deadlock.
    const [profile] = await tx.select().from(targetProfiles).where(eq(targetProfiles.id, input.profileId)).for("share");
    const { effect, teamId } = await lockEffect(tx, input.effectId);
    if (!profile || profile.teamId !== teamId)
      throw new DomainError("That target profile does not belong to this team.", { field: "targetProfileId", status: 404 });
    if (effect.version !== input.expectedVersion) throw stale("effect", effect.version, input.expectedVersion);
    const next = followingDocument(effect, profile);
    const [saved] = await tx
      .update(effects)
      .set({
        document: next.document,
        targetProfileId: profile.id,
        followsProfile: true,
        version: sql`${effects.version} + 1`,
        updatedBy: input.actorId,
      })
      .where(eq(effects.id, effect.id))
      .returning();
    await noteProfileChange(
      tx,
      { effectId: effect.id, profile, profileName: profile.name, profileVersion: profile.version, effectVersion: saved.version },
      [{ field: "profile", label: "Target profile", from: "own settings", to: `follows ${profile.name}` }, ...next.changes],
      input.actorId,
    );
    await recordActivity(tx, {
      teamId,
      projectId: effect.projectId,
      userId: input.actorId,
      action: "effect.followed_profile",
      summary: `made the effect ${effect.name} follow the target profile ${profile.name}`,
    });
    return saved;
  });
}

/** The export options an effect exports with by default: its profile's (see exportDefaultsForProfile), else core's. */
export async function exportDefaultsForEffect(db: Tx, effect: Pick<EffectRow, "name" | "targetProfileId">): Promise<ExportOptionsInput> {
  const profile = effect.targetProfileId ? await getTargetProfile(db, effect.targetProfileId) : null;
  return exportDefaultsForProfile(profile, effect.name);
}
