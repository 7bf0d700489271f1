import { checkEffect, decodePng, EffectError, type Effect } from "@skewsmith/core";
import { applyProfileToDocument } from "../profiles/apply.ts";
import { and, asc, desc, eq, isNotNull, isNull, ne, sql } from "drizzle-orm";
import { preparedOnce, type Tx } from "../db/client.server.ts";
import { effects, projects, sprites, targetProfiles, users, type EffectRow } from "../db/schema.ts";
import { newEffectDocument } from "../effects/settings.ts";
import { NAME_MAX } from "../forms.ts";
import { spriteColours, tooManyColours } from "../sprites/colours.ts";
import { recordActivity } from "./activity.server.ts";
import { DomainError, isUniqueViolation, staleVersion } from "./errors.ts";
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

/**
 * Serialises the changes that pick or check a name among a project's effects (create, duplicate, rename, restore):
 * they take the project row's lock in turn, so the check of a free name and the insert that uses it cannot be split
 * by another's. Twenty duplicates at once then get twenty distinct copy names, one after another.
 */
async function lockNames(tx: Tx, projectId: string) {
  const [project] = await tx.select().from(projects).where(eq(projects.id, projectId)).for("no key update");
  if (!project) throw new DomainError("That project does not exist.", { status: 404 });
  // Checked again under the lock: the project may have been archived while this change waited for it.
  if (project.archivedAt) throw new DomainError("The project is archived; restore it before changing its effects.", { status: 409 });
  return project;
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
      const project = await lockNames(tx, input.projectId);
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
          .select({ id: sprites.id, name: sprites.name, png: sprites.png })
          .from(sprites)
          .where(and(eq(sprites.id, input.spriteId), eq(sprites.projectId, project.id)));
        if (!sprite) throw new DomainError("That sprite does not belong to this project.", { field: "spriteId" });
        // A new effect made for a target with a colour limit starts within it, as a bench save would have to.
        if (profile?.maxColours != null) {
          const colours = spriteColours(decodePng(sprite.png));
          if (colours > profile.maxColours)
            throw new DomainError(tooManyColours({ sprite: sprite.name, colours, profile: profile.name, limit: profile.maxColours }), {
              field: "spriteId",
            });
        }
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
    await lockNames(tx, project.id);
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

/** Renames an effect, if nobody changed it since `expectedVersion` (its document's version, which goes up by one). */
export async function renameEffect(
  db: Tx,
  input: { effectId: string; name: string; expectedVersion: number; actorId: string },
): Promise<EffectRow> {
  return guardUnique(input.name, () =>
    db.transaction(async (tx) => {
      const { effect: before, project } = await changeableEffect(tx, input.effectId);
      if (before.version !== input.expectedVersion) throw staleVersion("effect", before, input.expectedVersion, "name");
      if (before.name === input.name) return before;
      await lockNames(tx, project.id);
      await assertNameFree(tx, project.id, input.name, before.id);
      const [after] = await tx
        .update(effects)
        .set({ name: input.name, version: sql`${effects.version} + 1`, updatedBy: input.actorId })
        .where(and(eq(effects.id, before.id), eq(effects.version, input.expectedVersion)))
        .returning();
      if (!after) throw staleVersion("effect", (await getEffect(tx, before.id)) ?? before, input.expectedVersion, "name");
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
      const project = await lockNames(tx, effect.projectId);
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

/** The columns of an effect in a project's list (both queries below). */
const effectListColumns = {
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
};

/** A project's live (or deleted) effects, by name (deleted ones newest first). */
export async function listEffects(db: Tx, projectId: string, options: { deleted?: boolean } = {}): Promise<EffectListItem[]> {
  const rows = await db
    .select(effectListColumns)
    .from(effects)
    .leftJoin(targetProfiles, eq(targetProfiles.id, effects.targetProfileId))
    .leftJoin(sprites, eq(sprites.id, effects.spriteId))
    .leftJoin(users, eq(users.id, effects.updatedBy))
    .where(and(eq(effects.projectId, projectId), options.deleted ? isNotNull(effects.deletedAt) : isNull(effects.deletedAt)))
    .orderBy(...(options.deleted ? [desc(effects.deletedAt)] : [asc(sql`lower(${effects.name})`)]));
  return rows;
}

/**
 * A project's live effects (by name) and its deleted ones (latest deleted first) from one query: what the project
 * page shows, in one round trip instead of two.
 */
export async function listEffectsAndDeleted(db: Tx, projectId: string): Promise<{ live: EffectListItem[]; deleted: EffectListItem[] }> {
  const query = preparedOnce(db, "skewsmith_effects_of_project", (d) =>
    d
      .select(effectListColumns)
      .from(effects)
      .leftJoin(targetProfiles, eq(targetProfiles.id, effects.targetProfileId))
      .leftJoin(sprites, eq(sprites.id, effects.spriteId))
      .leftJoin(users, eq(users.id, effects.updatedBy))
      .where(eq(effects.projectId, sql.placeholder("projectId")))
      .orderBy(asc(sql`lower(${effects.name})`))
      .prepare("skewsmith_effects_of_project"),
  );
  const rows = await query.execute({ projectId });
  return {
    live: rows.filter((r) => r.deletedAt === null),
    deleted: rows.filter((r) => r.deletedAt !== null).sort((a, b) => b.deletedAt!.getTime() - a.deletedAt!.getTime()),
  };
}

/** What the bench saves in one go: the document and everything stored beside it in the effects row. */
export interface BenchSaveInput {
  effectId: string;
  /** The version the person's edits started from; a save after anyone else's is refused. */
  expectedVersion: number;
  actorId: string;
  document: unknown;
  targetProfileId: string | null;
  followsProfile: boolean;
  spriteId: string | null;
  spriteX: number | null;
  spriteY: number | null;
  keyPixels: [number, number][];
}

/** The bench's save: done (with the parts that changed), or refused because someone saved first (with their row). */
export type BenchSaveResult = { ok: true; effect: EffectRow; changed: string[] } | { ok: false; current: EffectRow };

/** The parts of an effect a save changes, in words, for the activity list. */
function benchChanges(
  before: EffectRow,
  after: Omit<BenchSaveInput, "document" | "effectId" | "expectedVersion" | "actorId"> & { document: Effect },
) {
  const a = validDocument(before.document);
  const b = after.document;
  const same = (x: unknown, y: unknown) => JSON.stringify(x) === JSON.stringify(y);
  const parts: [boolean, string][] = [
    [!same(a.canvas, b.canvas), "canvas"],
    [!same(a.pivot, b.pivot), "pivot"],
    [!same(a.angles, b.angles), "angle track"],
    [!same(a.fixedPoint, b.fixedPoint), "fixed point"],
    [a.rounding !== b.rounding, "rounding"],
    [a.halfTurn !== b.halfTurn, "half-turn rule"],
    [a.edges !== b.edges, "edges"],
    [a.columnGroup !== b.columnGroup, "column group"],
    [
      before.targetProfileId !== after.targetProfileId ||
        (before.targetProfileId !== null && before.followsProfile) !== (after.targetProfileId !== null && after.followsProfile),
      "target profile",
    ],
    [before.spriteId !== after.spriteId, "sprite"],
    [before.spriteX !== after.spriteX || before.spriteY !== after.spriteY, "sprite placement"],
    [!same([...before.keyPixels].map(String).sort(), [...after.keyPixels].map(String).sort()), "key pixels"],
  ];
  return parts.filter(([changed]) => changed).map(([, what]) => what);
}

/**
 * Saves the bench in one transaction and one version: the document (validated by core; while the effect follows its
 * target profile, the profile's settings win), the target profile and whether it is followed, the sprite, its
 * placement and the key pixels. A save that names an old version is refused with the row as it is now, so nothing
 * anyone saved is overwritten unseen; a save that changes nothing keeps the version.
 */
export async function saveEffectBench(db: Tx, input: BenchSaveInput): Promise<BenchSaveResult> {
  return db.transaction(async (tx) => {
    const { effect, project } = await changeableEffect(tx, input.effectId);
    if (effect.version !== input.expectedVersion) return { ok: false, current: effect };
    let valid = validDocument(input.document);
    let limit: { profile: string; colours: number } | null = null;
    if (input.targetProfileId) {
      const [profile] = await tx
        .select()
        .from(targetProfiles)
        .where(and(eq(targetProfiles.id, input.targetProfileId), eq(targetProfiles.teamId, project.teamId)));
      if (!profile) throw new DomainError("That target profile does not belong to this team.", { field: "targetProfileId" });
      if (profile.maxColours !== null) limit = { profile: profile.name, colours: profile.maxColours };
      if (input.followsProfile) {
        try {
          valid = applyProfileToDocument(valid, profile).document;
        } catch (error) {
          if (!(error instanceof EffectError)) throw error;
          throw new DomainError(
            `The profile's settings do not fit this effect: ${error.issues.map((i) => `${i.path}: ${i.message}`).join("; ")}`,
            {
              field: "targetProfileId",
            },
          );
        }
      }
    }
    let bounds = valid.canvas;
    if (input.spriteId) {
      const [sprite] = await tx
        .select({ width: sprites.width, height: sprites.height, name: sprites.name, png: sprites.png })
        .from(sprites)
        .where(and(eq(sprites.id, input.spriteId), eq(sprites.projectId, project.id)));
      if (!sprite) throw new DomainError("That sprite does not belong to this project.", { field: "spriteId" });
      bounds = sprite;
      // The target's colour limit, checked when this save chooses the sprite or the profile (an effect saved before a
      // limit was lowered keeps saving its other settings).
      const chosen = input.spriteId !== effect.spriteId || input.targetProfileId !== effect.targetProfileId;
      if (limit && chosen) {
        const colours = spriteColours(decodePng(sprite.png));
        if (colours > limit.colours)
          throw new DomainError(tooManyColours({ sprite: sprite.name, colours, profile: limit.profile, limit: limit.colours }), {
            field: "spriteId",
          });
      }
    }
    const outside = input.keyPixels.find(([x, y]) => !(x >= 0 && y >= 0 && x < bounds.width && y < bounds.height));
    if (outside)
      throw new DomainError(
        `Key pixel (${outside[0]}, ${outside[1]}) is outside the ${input.spriteId ? "sprite" : "canvas"}: allowed x 0 to ${bounds.width - 1}, y 0 to ${bounds.height - 1}.`,
        { field: "keyPixels" },
      );
    const next = {
      document: valid,
      targetProfileId: input.targetProfileId,
      followsProfile: input.targetProfileId !== null && input.followsProfile,
      spriteId: input.spriteId,
      spriteX: input.spriteX,
      spriteY: input.spriteY,
      keyPixels: input.keyPixels,
    };
    const changed = benchChanges(effect, next);
    if (changed.length === 0) return { ok: true, effect, changed };
    const [saved] = await tx
      .update(effects)
      .set({ ...next, version: sql`${effects.version} + 1`, updatedBy: input.actorId })
      .where(and(eq(effects.id, effect.id), eq(effects.version, input.expectedVersion)))
      .returning();
    // Someone's save committed between our read and our write: theirs stands, ours is refused.
    if (!saved) return { ok: false, current: await mustGet(tx, effect.id) };
    await recordActivity(tx, {
      teamId: project.teamId,
      projectId: project.id,
      userId: input.actorId,
      action: "effect.saved",
      summary: `saved version ${saved.version} of ${effect.name} (${changed.join(", ")})`,
    });
    return { ok: true, effect: saved, changed };
  });
}
