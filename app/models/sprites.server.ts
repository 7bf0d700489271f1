/**
 * A project's sprites: PNG files (indexed or RGBA) kept in PostgreSQL with their size and palette. Every change
 * names the version it started from, so a stale rename, replacement or delete is refused (409) instead of
 * overwriting someone else's change. The sprite row is locked (FOR UPDATE) while a change looks at the effects using
 * it: attaching a sprite to an effect takes a key-share lock on that row, so no effect starts using it mid-change.
 */
import { decodePng, type Image } from "@skewsmith/core";
import { and, asc, eq, inArray, isNotNull, sql } from "drizzle-orm";
import { preparedOnce, type Tx } from "../db/client.server.ts";
import { effects, sprites, targetProfiles, users, type EffectRow, type Sprite, type SpriteKind } from "../db/schema.ts";
import { insideCanvas, spritePlacement } from "../effects/placement.ts";
import { spriteColours, tooManyColours } from "../sprites/colours.ts";
import { decodeSprite, SpriteFileError } from "../sprites/spriteFile.ts";
import { recordActivity } from "./activity.server.ts";
import { DomainError, isUniqueViolation } from "./errors.ts";
import { mustGetProject } from "./projects.server.ts";

export { SPRITE_MAX_BYTES, SPRITE_MAX_SIDE } from "../sprites/spriteFile.ts";

const NAME_TAKEN = (name: string) =>
  new DomainError(`The project already has a sprite called “${name}”. Choose another name.`, { field: "name", status: 409 });

/** Decodes an uploaded file; any problem becomes a field message on the file input. */
function readFile(png: Uint8Array): Image {
  try {
    return decodeSprite(png);
  } catch (error) {
    if (error instanceof SpriteFileError) throw new DomainError(error.message, { field: "file" });
    throw error;
  }
}

/** The columns a decoded picture fills in. */
function pictureColumns(png: Uint8Array, image: Image) {
  return {
    png: Buffer.from(png),
    kind: image.kind as SpriteKind,
    byteSize: png.byteLength,
    width: image.width,
    height: image.height,
    palette: image.kind === "indexed" ? image.palette.map((p) => [...p] as [number, number, number, number]) : [],
  };
}

const pictureSummary = (image: Image) =>
  `${image.width} × ${image.height}, ${image.kind === "indexed" ? `${image.palette.length} colours` : "RGBA"}`;

async function liveProject(db: Tx, projectId: string) {
  const project = await mustGetProject(db, projectId);
  if (project.archivedAt) throw new DomainError("The project is archived; restore it before changing its sprites.", { status: 409 });
  return project;
}

async function guardUnique<T>(name: string, work: () => Promise<T>): Promise<T> {
  try {
    return await work();
  } catch (error) {
    if (isUniqueViolation(error, "sprites_project_name_key")) throw NAME_TAKEN(name);
    throw error;
  }
}

async function assertNameFree(db: Tx, projectId: string, name: string, exceptId?: string): Promise<void> {
  const clash = await db
    .select({ id: sprites.id })
    .from(sprites)
    .where(and(eq(sprites.projectId, projectId), sql`lower(${sprites.name}) = lower(${name})`));
  if (clash.some((c) => c.id !== exceptId)) throw NAME_TAKEN(name);
}

/**
 * The sprite, locked for the rest of the transaction, if it belongs to `projectId` and is still at `expectedVersion`:
 * otherwise 404 (not in this project) or 409 (changed since the person looked).
 */
async function lockedSprite(tx: Tx, input: { spriteId: string; projectId: string; expectedVersion: number }): Promise<Sprite> {
  const [sprite] = await tx.select().from(sprites).where(eq(sprites.id, input.spriteId)).for("update");
  if (!sprite || sprite.projectId !== input.projectId) throw new DomainError("That sprite is not in this project.", { status: 404 });
  if (sprite.version !== input.expectedVersion)
    throw new DomainError(
      `Someone changed ${sprite.name} after you opened it (now version ${sprite.version}, you started from ${input.expectedVersion}). Reload to see their change, then try again.`,
      { status: 409 },
    );
  return sprite;
}

/** Stores a PNG (indexed or RGBA) as a project's sprite, with its size, kind and palette read from the file. */
export async function createSprite(
  db: Tx,
  input: { projectId: string; name: string; png: Uint8Array; actorId: string | null },
): Promise<Sprite> {
  const image = readFile(input.png);
  return guardUnique(input.name, () =>
    db.transaction(async (tx) => {
      const project = await liveProject(tx, input.projectId);
      await assertNameFree(tx, project.id, input.name);
      const [sprite] = await tx
        .insert(sprites)
        .values({ projectId: project.id, name: input.name, ...pictureColumns(input.png, image), uploadedBy: input.actorId })
        .returning();
      await recordActivity(tx, {
        teamId: project.teamId,
        projectId: project.id,
        userId: input.actorId,
        action: "sprite.added",
        summary: `added the sprite ${input.name} (${pictureSummary(image)})`,
      });
      return sprite;
    }),
  );
}

/** Renames a sprite if nobody changed it since `expectedVersion`; names are unique in a project, whatever their case. */
export async function renameSprite(
  db: Tx,
  input: { projectId: string; spriteId: string; name: string; expectedVersion: number; actorId: string },
): Promise<Sprite> {
  return guardUnique(input.name, () =>
    db.transaction(async (tx) => {
      const project = await liveProject(tx, input.projectId);
      const before = await lockedSprite(tx, input);
      if (before.name === input.name) return before;
      await assertNameFree(tx, project.id, input.name, before.id);
      const [after] = await tx
        .update(sprites)
        .set({ name: input.name, version: sql`${sprites.version} + 1` })
        .where(eq(sprites.id, before.id))
        .returning();
      await recordActivity(tx, {
        teamId: project.teamId,
        projectId: project.id,
        userId: input.actorId,
        action: "sprite.renamed",
        summary: `renamed the sprite ${before.name} to ${input.name}`,
      });
      return after;
    }),
  );
}

/** An effect that uses a sprite, as the library lists it. */
export interface SpriteUse {
  id: string;
  name: string;
  /** True for an effect in the project's "Recently deleted" list. */
  deleted: boolean;
}

async function effectsUsing(tx: Tx, spriteId: string): Promise<EffectRow[]> {
  return tx
    .select()
    .from(effects)
    .where(eq(effects.spriteId, spriteId))
    .orderBy(asc(sql`lower(${effects.name})`));
}

/**
 * Refuses a picture with more colours than the target profile of an effect using the sprite allows (deleted effects
 * are not checked: they are restored with the sprite as it is then).
 */
async function checkColourLimits(tx: Tx, spriteName: string, image: Image, users: EffectRow[]): Promise<void> {
  const profileIds = [...new Set(users.map((e) => e.targetProfileId).filter((id): id is string => id !== null))];
  if (profileIds.length === 0) return;
  const limited = await tx
    .select({ id: targetProfiles.id, name: targetProfiles.name, maxColours: targetProfiles.maxColours })
    .from(targetProfiles)
    .where(and(inArray(targetProfiles.id, profileIds), isNotNull(targetProfiles.maxColours)));
  if (limited.length === 0) return;
  const colours = spriteColours(image);
  const byId = new Map(limited.map((p) => [p.id, p]));
  const clash = users
    .map((e) => ({ effect: e, profile: e.targetProfileId ? byId.get(e.targetProfileId) : undefined }))
    .filter((u) => u.profile && u.profile.maxColours !== null && colours > u.profile.maxColours)
    .sort((a, b) => a.profile!.maxColours! - b.profile!.maxColours!)[0];
  if (clash)
    throw new DomainError(
      tooManyColours({
        sprite: `The new picture of ${spriteName}`,
        colours,
        profile: clash.profile!.name,
        limit: clash.profile!.maxColours!,
        effect: clash.effect.name,
      }),
      { field: "file", status: 409 },
    );
}

const canvasOf = (effect: EffectRow) => (effect.document as { canvas: { width: number; height: number } }).canvas;

/** Key pixels (sprite pixels) that still lie on a picture of the given size. */
const keptKeyPixels = (effect: EffectRow, width: number, height: number) =>
  effect.keyPixels.filter(([x, y]) => x >= 0 && y >= 0 && x < width && y < height);

/** What a replacement did, for the person who asked: the sprite and one sentence per thing worth knowing. */
export interface ReplaceResult {
  sprite: Sprite;
  notes: string[];
}

/**
 * Puts a new picture under an existing sprite (same id, same name): effects using it keep working with the new
 * pixels. Refused (409, naming the effects) when the new picture, placed where an effect places it (its spriteX and
 * spriteY, or centred), would no longer lie inside that effect's canvas although the old one did. When the size
 * changes, key pixels that fall outside the new picture are dropped from each effect (and said so), and each such
 * effect's version goes up so a stale save of it is refused.
 */
export async function replaceSprite(
  db: Tx,
  input: { projectId: string; spriteId: string; png: Uint8Array; expectedVersion: number; actorId: string },
): Promise<ReplaceResult> {
  const image = readFile(input.png);
  return db.transaction(async (tx) => {
    const project = await liveProject(tx, input.projectId);
    const before = await lockedSprite(tx, input);
    const users = (await effectsUsing(tx, before.id)).filter((e) => !e.deletedAt);
    await checkColourLimits(tx, before.name, image, users);
    const resized = before.width !== image.width || before.height !== image.height;
    const notes: string[] = [];
    if (resized) {
      const cut = users.filter((e) => {
        const canvas = canvasOf(e);
        const was = insideCanvas(spritePlacement(canvas, before, e.spriteX, e.spriteY), canvas);
        const now = insideCanvas(spritePlacement(canvas, image, e.spriteX, e.spriteY), canvas);
        return was && !now;
      });
      if (cut.length > 0)
        throw new DomainError(
          `The new picture is ${image.width} × ${image.height} pixels and would no longer fit inside the canvas of ${cut
            .map((e) => {
              const c = canvasOf(e);
              const at = spritePlacement(c, image, e.spriteX, e.spriteY);
              return `${e.name} (${c.width} × ${c.height}, sprite at ${at.x}, ${at.y})`;
            })
            .join("; ")}. Grow that canvas or move the sprite first, or upload the picture as a new sprite.`,
          { field: "file", status: 409 },
        );
      for (const e of users) {
        const kept = keptKeyPixels(e, image.width, image.height);
        if (kept.length === e.keyPixels.length) continue;
        await tx
          .update(effects)
          .set({ keyPixels: kept, version: sql`${effects.version} + 1`, updatedBy: input.actorId })
          .where(eq(effects.id, e.id));
        const dropped = e.keyPixels.length - kept.length;
        notes.push(`${e.name} lost ${dropped} key pixel${dropped === 1 ? "" : "s"} that lay outside the new picture.`);
      }
      const centred = users.filter((e) => e.spriteX === null || e.spriteY === null).length;
      if (centred > 0) notes.push(`Effects that centre the sprite centre the new size (${centred} of ${users.length}).`);
    }
    const [sprite] = await tx
      .update(sprites)
      .set({ ...pictureColumns(input.png, image), uploadedBy: input.actorId, version: sql`${sprites.version} + 1` })
      .where(eq(sprites.id, before.id))
      .returning();
    if (users.length > 0)
      notes.unshift(
        `${users.length === 1 ? "1 effect uses" : `${users.length} effects use`} it and now turn${users.length === 1 ? "s" : ""} the new picture: ${users.map((e) => e.name).join(", ")}.`,
      );
    await recordActivity(tx, {
      teamId: project.teamId,
      projectId: project.id,
      userId: input.actorId,
      action: "sprite.replaced",
      summary: `replaced the picture of ${before.name} (${pictureSummary(image)})`,
    });
    return { sprite, notes };
  });
}

/**
 * Deletes a sprite and detaches it from every effect that uses it (deleted ones too). An effect keeps its settings;
 * its key pixels move to the same canvas pixels (those off the canvas go), its placement is cleared and its version
 * goes up. `expectedUsers` is the list of effect ids the person was shown: if another effect started using the sprite
 * since, nothing is deleted (409), so nobody detaches an effect they were not told about.
 */
export async function deleteSprite(
  db: Tx,
  input: { projectId: string; spriteId: string; expectedVersion: number; expectedUsers: string[]; actorId: string },
): Promise<{ name: string; detached: string[] }> {
  return db.transaction(async (tx) => {
    const project = await liveProject(tx, input.projectId);
    const sprite = await lockedSprite(tx, input);
    const users = await effectsUsing(tx, sprite.id);
    const shown = new Set(input.expectedUsers);
    const unseen = users.filter((e) => !shown.has(e.id));
    if (unseen.length > 0)
      throw new DomainError(
        `Since you opened this, ${unseen.map((e) => e.name).join(", ")} started using ${sprite.name}. Nothing was deleted; look again and confirm.`,
        { status: 409 },
      );
    for (const e of users) {
      const canvas = canvasOf(e);
      const at = spritePlacement(canvas, sprite, e.spriteX, e.spriteY);
      const keyPixels = e.keyPixels
        .map(([x, y]) => [x + at.x, y + at.y] as [number, number])
        .filter(([x, y]) => x >= 0 && y >= 0 && x < canvas.width && y < canvas.height);
      await tx
        .update(effects)
        .set({ spriteId: null, spriteX: null, spriteY: null, keyPixels, version: sql`${effects.version} + 1`, updatedBy: input.actorId })
        .where(eq(effects.id, e.id));
    }
    await tx.delete(sprites).where(eq(sprites.id, sprite.id));
    const detached = users.map((e) => e.name);
    await recordActivity(tx, {
      teamId: project.teamId,
      projectId: project.id,
      userId: input.actorId,
      action: "sprite.deleted",
      summary: `deleted the sprite ${sprite.name}${detached.length ? ` (detached from ${detached.join(", ")})` : ""}`,
    });
    return { name: sprite.name, detached };
  });
}

export interface SpriteListItem {
  id: string;
  name: string;
  kind: SpriteKind;
  width: number;
  height: number;
  /** Palette entries (indexed sprites); empty for RGBA. */
  palette: [number, number, number, number][];
  colours: number;
  byteSize: number;
  version: number;
  uploadedByName: string | null;
  createdAt: Date;
  updatedAt: Date;
  /** The project's effects that use this sprite, by name. */
  usedBy: SpriteUse[];
}

/** A project's sprites, by name, without their bytes, each with the effects that use it: one query (pages show it). */
export async function listSprites(db: Tx, projectId: string): Promise<SpriteListItem[]> {
  const query = preparedOnce(db, "skewsmith_sprites_of_project", (d) => {
    const usedBy = sql<SpriteUse[]>`coalesce((
      select json_agg(json_build_object('id', e.id, 'name', e.name, 'deleted', e.deleted_at is not null) order by lower(e.name), e.id)
      from ${effects} e where e.sprite_id = ${sprites.id}), '[]'::json)`;
    return d
      .select({
        id: sprites.id,
        name: sprites.name,
        kind: sprites.kind,
        width: sprites.width,
        height: sprites.height,
        palette: sprites.palette,
        byteSize: sprites.byteSize,
        version: sprites.version,
        uploadedByName: sql<string | null>`coalesce(${users.name}, ${users.login})`,
        createdAt: sprites.createdAt,
        updatedAt: sprites.updatedAt,
        usedBy,
      })
      .from(sprites)
      .leftJoin(users, eq(users.id, sprites.uploadedBy))
      .where(eq(sprites.projectId, sql.placeholder("projectId")))
      .orderBy(asc(sql`lower(${sprites.name})`))
      .prepare("skewsmith_sprites_of_project");
  });
  const rows = await query.execute({ projectId });
  return rows.map((r) => ({ ...r, colours: r.palette.length }));
}

/** A sprite's PNG bytes, its version and the project it belongs to. */
export async function getSpriteFile(
  db: Tx,
  spriteId: string,
): Promise<{ projectId: string; name: string; version: number; png: Buffer } | null> {
  const [row] = await db
    .select({ projectId: sprites.projectId, name: sprites.name, version: sprites.version, png: sprites.png })
    .from(sprites)
    .where(eq(sprites.id, spriteId));
  return row ?? null;
}

/** A sprite's version (bumped by every change, a new picture included), or null when there is no such sprite. */
export async function getSpriteVersion(db: Tx, spriteId: string): Promise<number | null> {
  const [row] = await db.select({ version: sprites.version }).from(sprites).where(eq(sprites.id, spriteId));
  return row?.version ?? null;
}

/** A sprite's row and its decoded picture (core's decodePng: the stored file passed every upload check on the way in). */
export async function getSpriteImage(db: Tx, spriteId: string): Promise<{ sprite: Sprite; image: Image } | null> {
  const [sprite] = await db.select().from(sprites).where(eq(sprites.id, spriteId));
  if (!sprite) return null;
  return { sprite, image: decodePng(sprite.png) };
}
