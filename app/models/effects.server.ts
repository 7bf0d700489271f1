import { checkEffect, type Effect } from "@skewsmith/core";
import { and, asc, desc, eq, isNotNull, isNull, ne, sql } from "drizzle-orm";
import type { Tx } from "../db/client.server.ts";
import { effects, sprites, targetProfiles, users, type EffectRow } from "../db/schema.ts";
import { newEffectDocument } from "../effects/settings.ts";
import { NAME_MAX } from "../forms.ts";
import { recordActivity } from "./activity.server.ts";
import { DomainError, isUniqueViolation } from "./errors.ts";
import { mustGetProject } from "./projects.server.ts";

const NAME_TAKEN = (name: string) =>
  new DomainError(`The project already has an effect called “${name}”. Choose another name.`, { field: "name", status: 409 });

/** Validates a document with core; the filled-in effect, or a DomainError listing every bad field. */
export function validDocument(document: unknown): Effect {
  const result = checkEffect(document);
  if (!result.ok)
    throw new DomainError(
      `The effect document is not valid: ${result.issues.map((i) => `${i.path || "(document)"}: ${i.message}`).join("; ")}`,
      {
        field: "document",
      },
    );
  return result.effect;
}

async function assertNameFree(db: Tx, projectId: string, name: string, exceptId?: string): Promise<void> {
  const clash = await db
    .select({ id: effects.id })
    .from(effects)
    .where(
      and(
        eq(effects.projectId, projectId),
        isNull(effects.deletedAt),
        sql`lower(${effects.name}) = lower(${name})`,
        exceptId ? ne(effects.id, exceptId) : undefined,
      ),
    );
  if (clash.length > 0) throw NAME_TAKEN(name);
}

async function guardUnique<T>(name: string, work: () => Promise<T>): Promise<T> {
  try {
    return await work();
  } catch (error) {
    if (isUniqueViolation(error, "effects_project_live_name_key")) throw NAME_TAKEN(name);
    throw error;
  }
}

async function liveProject(db: Tx, projectId: string) {
  const project = await mustGetProject(db, projectId);
  if (project.archivedAt) throw new DomainError("The project is archived; restore it before changing its effects.", { status: 409 });
  return project;
}

/**
 * Creates an effect. Without a document it starts from the target profile's settings (or core's
 * defaults on a 64 × 64 canvas) with a full-turn sweep; any document is validated by core first.
 */
export async function createEffect(
  db: Tx,
  input: {
    projectId: string;
    name: string;
    actorId: string | null;
    description?: string;
    targetProfileId?: string | null;
    spriteId?: string | null;
    /** Where the sprite's top-left pixel sits in the canvas; null or absent centres it. */
    spriteX?: number | null;
    spriteY?: number | null;
    document?: unknown;
  },
): Promise<EffectRow> {
  return guardUnique(input.name, () =>
    db.transaction(async (tx) => {
      const project = await liveProject(tx, input.projectId);
      let profile = null;
      if (input.targetProfileId) {
        [profile] = await tx
          .select()
          .from(targetProfiles)
          .where(and(eq(targetProfiles.id, input.targetProfileId), eq(targetProfiles.teamId, project.teamId)))
          // Held until commit, so a profile change cannot slip in between reading its settings and following it.
          .for("share");
        if (!profile) throw new DomainError("That target profile does not belong to this team.", { field: "targetProfileId" });
      }
      if (input.spriteId) {
        const [sprite] = await tx
          .select({ id: sprites.id })
          .from(sprites)
          .where(and(eq(sprites.id, input.spriteId), eq(sprites.projectId, project.id)));
        if (!sprite) throw new DomainError("That sprite does not belong to this project.", { field: "spriteId" });
      }
      const document = input.document === undefined ? newEffectDocument(profile ?? undefined) : validDocument(input.document);
      await assertNameFree(tx, project.id, input.name);
      const [effect] = await tx
        .insert(effects)
        .values({
          projectId: project.id,
          name: input.name,
          description: input.description ?? "",
          document,
          targetProfileId: profile?.id ?? null,
          spriteId: input.spriteId ?? null,
          spriteX: input.spriteX ?? null,
          spriteY: input.spriteY ?? null,
          createdBy: input.actorId,
          updatedBy: input.actorId,
        })
        .returning();
      await recordActivity(tx, {
        teamId: project.teamId,
        projectId: project.id,
        userId: input.actorId,
        action: "effect.created",
        summary: `created the effect ${input.name}`,
      });
      return effect;
    }),
  );
}

export async function getEffect(db: Tx, effectId: string): Promise<EffectRow | null> {
  const [effect] = await db.select().from(effects).where(eq(effects.id, effectId));
  return effect ?? null;
}

async function mustGet(db: Tx, effectId: string): Promise<EffectRow> {
  const effect = await getEffect(db, effectId);
  if (!effect) throw new DomainError("That effect does not exist.", { status: 404 });
  return effect;
}

/** An effect that may change, with its project: it exists, is not deleted, and its project is not archived. */
async function changeableEffect(db: Tx, effectId: string) {
  const effect = await mustGet(db, effectId);
  if (effect.deletedAt) throw new DomainError("That effect was deleted; restore it first.", { status: 409 });
  const project = await liveProject(db, effect.projectId);
  return { effect, project };
}

/** The first free "<name> copy", "<name> copy 2", … in the project. */
async function copyName(db: Tx, projectId: string, name: string): Promise<string> {
  const rows = await db
    .select({ name: effects.name })
    .from(effects)
    .where(and(eq(effects.projectId, projectId), isNull(effects.deletedAt)));
  const taken = new Set(rows.map((r) => r.name.toLowerCase()));
  const stem = `${name.slice(0, NAME_MAX - 8)} copy`;
  let candidate = stem;
  for (let n = 2; taken.has(candidate.toLowerCase()); n++) candidate = `${stem} ${n}`;
  return candidate;
}

/** Copies an effect (document, target profile and sprite) under a new name in the same project. */
export async function duplicateEffect(db: Tx, input: { effectId: string; actorId: string }): Promise<EffectRow> {
  return db.transaction(async (tx) => {
    const { effect: source, project } = await changeableEffect(tx, input.effectId);
    const name = await copyName(tx, project.id, source.name);
    const [copy] = await tx
      .insert(effects)
      .values({
        projectId: project.id,
        name,
        description: source.description,
        document: validDocument(source.document),
        targetProfileId: source.targetProfileId,
        followsProfile: source.followsProfile,
        spriteId: source.spriteId,
        spriteX: source.spriteX,
        spriteY: source.spriteY,
        keyPixels: source.keyPixels,
        createdBy: input.actorId,
        updatedBy: input.actorId,
      })
      .returning();
    await recordActivity(tx, {
      teamId: project.teamId,
      projectId: project.id,
      userId: input.actorId,
      action: "effect.duplicated",
      summary: `duplicated ${source.name} as ${name}`,
    });
    return copy;
  });
}

export async function renameEffect(db: Tx, input: { effectId: string; name: string; actorId: string }): Promise<EffectRow> {
  return guardUnique(input.name, () =>
    db.transaction(async (tx) => {
      const { effect: before, project } = await changeableEffect(tx, input.effectId);
      if (before.name === input.name) return before;
      await assertNameFree(tx, project.id, input.name, before.id);
      const [after] = await tx
        .update(effects)
        .set({ name: input.name, updatedBy: input.actorId })
        .where(eq(effects.id, before.id))
        .returning();
      await recordActivity(tx, {
        teamId: project.teamId,
        projectId: project.id,
        userId: input.actorId,
        action: "effect.renamed",
        summary: `renamed the effect ${before.name} to ${input.name}`,
      });
      return after;
    }),
  );
}

/** Deletes an effect softly: it leaves the list and can be restored during the grace period. */
export async function deleteEffect(db: Tx, input: { effectId: string; actorId: string }): Promise<void> {
  await db.transaction(async (tx) => {
    const effect = await mustGet(tx, input.effectId);
    if (effect.deletedAt) return;
    const project = await liveProject(tx, effect.projectId);
    await tx.update(effects).set({ deletedAt: new Date(), updatedBy: input.actorId }).where(eq(effects.id, effect.id));
    await recordActivity(tx, {
      teamId: project.teamId,
      projectId: project.id,
      userId: input.actorId,
      action: "effect.deleted",
      summary: `deleted the effect ${effect.name}`,
    });
  });
}

/** Restores a deleted effect; refused while another live effect has its name. */
export async function restoreEffect(db: Tx, input: { effectId: string; actorId: string }): Promise<void> {
  const effect = await mustGet(db, input.effectId);
  await guardUnique(effect.name, () =>
    db.transaction(async (tx) => {
      if (!effect.deletedAt) return;
      const project = await liveProject(tx, effect.projectId);
      try {
        await assertNameFree(tx, project.id, effect.name, effect.id);
      } catch {
        throw new DomainError(`Another effect is now called “${effect.name}”. Rename that one first, then restore this one.`, {
          status: 409,
        });
      }
      await tx.update(effects).set({ deletedAt: null, updatedBy: input.actorId }).where(eq(effects.id, effect.id));
      await recordActivity(tx, {
        teamId: project.teamId,
        projectId: project.id,
        userId: input.actorId,
        action: "effect.restored",
        summary: `restored the effect ${effect.name}`,
      });
    }),
  );
}

/**
 * Saves a new effect document, validated by core, if nobody saved since `expectedVersion`; the version goes up by one.
 * A stale version is refused (409) so one person's save never silently overwrites another's.
 */
export async function saveEffectDocument(
  db: Tx,
  input: { effectId: string; document: unknown; expectedVersion: number; actorId: string },
): Promise<EffectRow> {
  const document = validDocument(input.document);
  return db.transaction(async (tx) => {
    const { effect, project } = await changeableEffect(tx, input.effectId);
    const [saved] = await tx
      .update(effects)
      .set({ document, version: sql`${effects.version} + 1`, updatedBy: input.actorId })
      .where(and(eq(effects.id, effect.id), eq(effects.version, input.expectedVersion)))
      .returning();
    if (!saved)
      throw new DomainError(
        `Someone saved this effect after you opened it (now version ${effect.version}, you started from ${input.expectedVersion}). Reload to see their changes.`,
        { status: 409 },
      );
    await recordActivity(tx, {
      teamId: project.teamId,
      projectId: project.id,
      userId: input.actorId,
      action: "effect.saved",
      summary: `saved version ${saved.version} of ${effect.name}`,
    });
    return saved;
  });
}

export interface EffectListItem {
  id: string;
  name: string;
  description: string;
  version: number;
  document: Effect;
  targetProfileName: string | null;
  spriteName: string | null;
  updatedAt: Date;
  updatedByName: string | null;
  deletedAt: Date | null;
}

/** A project's live (or deleted) effects, by name (deleted ones newest first). */
export async function listEffects(db: Tx, projectId: string, options: { deleted?: boolean } = {}): Promise<EffectListItem[]> {
  const rows = await db
    .select({
      id: effects.id,
      name: effects.name,
      description: effects.description,
      version: effects.version,
      document: effects.document,
      targetProfileName: targetProfiles.name,
      spriteName: sprites.name,
      updatedAt: effects.updatedAt,
      updatedByName: sql<string | null>`coalesce(${users.name}, ${users.login})`,
      deletedAt: effects.deletedAt,
    })
    .from(effects)
    .leftJoin(targetProfiles, eq(targetProfiles.id, effects.targetProfileId))
    .leftJoin(sprites, eq(sprites.id, effects.spriteId))
    .leftJoin(users, eq(users.id, effects.updatedBy))
    .where(and(eq(effects.projectId, projectId), options.deleted ? isNotNull(effects.deletedAt) : isNull(effects.deletedAt)))
    .orderBy(...(options.deleted ? [desc(effects.deletedAt)] : [asc(sql`lower(${effects.name})`)]));
  return rows;
}
