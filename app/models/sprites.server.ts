import { and, asc, eq, sql } from "drizzle-orm";
import type { Tx } from "../db/client.server.ts";
import { sprites, users, type Sprite } from "../db/schema.ts";
import { decodeIndexedPng } from "../sprites/png.ts";
import { recordActivity } from "./activity.server.ts";
import { DomainError } from "./errors.ts";
import { mustGetProject } from "./projects.server.ts";

/** Largest sprite file accepted, in bytes. */
export const SPRITE_MAX_BYTES = 4 * 1024 * 1024;

/** Stores an indexed PNG as a project's sprite, with its size and palette read from the file. */
export async function createSprite(
  db: Tx,
  input: { projectId: string; name: string; png: Uint8Array; actorId: string | null },
): Promise<Sprite> {
  if (input.png.byteLength > SPRITE_MAX_BYTES)
    throw new DomainError(`The file is ${input.png.byteLength} bytes; sprites can be at most ${SPRITE_MAX_BYTES} bytes.`, { field: "png" });
  let image;
  try {
    image = decodeIndexedPng(input.png);
  } catch (error) {
    throw new DomainError(`This file cannot be used as a sprite: ${(error as Error).message}.`, { field: "png" });
  }
  return db.transaction(async (tx) => {
    const project = await mustGetProject(tx, input.projectId);
    const [sprite] = await tx
      .insert(sprites)
      .values({
        projectId: project.id,
        name: input.name,
        png: Buffer.from(input.png),
        kind: "indexed",
        byteSize: input.png.byteLength,
        width: image.width,
        height: image.height,
        palette: image.palette.map((p) => [...p] as [number, number, number, number]),
        uploadedBy: input.actorId,
      })
      .returning();
    await recordActivity(tx, {
      teamId: project.teamId,
      projectId: project.id,
      userId: input.actorId,
      action: "sprite.added",
      summary: `added the sprite ${input.name} (${image.width} × ${image.height}, ${image.palette.length} colours)`,
    });
    return sprite;
  });
}

export interface SpriteListItem {
  id: string;
  name: string;
  width: number;
  height: number;
  colours: number;
  uploadedByName: string | null;
  createdAt: Date;
}

/** A project's sprites, by name, without their bytes. */
export async function listSprites(db: Tx, projectId: string): Promise<SpriteListItem[]> {
  return db
    .select({
      id: sprites.id,
      name: sprites.name,
      width: sprites.width,
      height: sprites.height,
      colours: sql<number>`jsonb_array_length(${sprites.palette})`,
      uploadedByName: sql<string | null>`coalesce(${users.name}, ${users.login})`,
      createdAt: sprites.createdAt,
    })
    .from(sprites)
    .leftJoin(users, eq(users.id, sprites.uploadedBy))
    .where(eq(sprites.projectId, projectId))
    .orderBy(asc(sql`lower(${sprites.name})`));
}

/** A sprite's PNG bytes and the project it belongs to. */
export async function getSpriteFile(db: Tx, spriteId: string): Promise<{ projectId: string; name: string; png: Buffer } | null> {
  const [row] = await db
    .select({ projectId: sprites.projectId, name: sprites.name, png: sprites.png })
    .from(sprites)
    .where(and(eq(sprites.id, spriteId)));
  return row ?? null;
}
