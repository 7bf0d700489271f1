/**
 * Seeds the demo scenario of docs/product.md once: the invented studio Tidewell Games, its three
 * members, a project with shared target profiles, the compass-rose emblem and the storm background.
 * Idempotent: when the demo team exists, nothing is touched (so changes made while trying the demo stay).
 *
 * Run: DATABASE_URL=… node --import tsx scripts/db/seed.ts
 */
import { canvasFit, opaqueMask, parseEffect } from "@skewsmith/core";
import { eq, sql } from "drizzle-orm";
import { pathToFileURL } from "node:url";
import { createDb, type Db } from "../../app/db/client.server.ts";
import { teams } from "../../app/db/schema.ts";
import { compassRose, stormBackground } from "../../app/demo/art.ts";
import { DEMO_PEOPLE, DEMO_TEAM, demoPerson, type DemoPerson } from "../../app/demo/people.ts";
import { makeEffect, makeProject, makeSprite, makeTargetProfile, makeTeam, makeUser } from "../../tests/factories.ts";

/** The demo project and its effects, as product.md describes them. */
export const DEMO_PROJECT = {
  name: "Lantern Quay",
  description:
    "Harbour-themed platformer for an 8-bit console: the spinning emblem of the title screen, and the tilting background of the storm level, kept tight on purpose to show what wrapping looks like.",
} as const;

/** Size of the emblem's sprite in pixels, and the tile size of the 8-bit target (8 × 8 tiles, a fact of such hardware). */
const ROSE_SIZE = 32;
const TILE = 8;
const roundUp = (n: number, step: number) => Math.ceil(n / step) * step;

/**
 * The emblem's canvas, from core's canvas-fit advice for the rose on a sprite-sized canvas: each side grows by at
 * least what the advice asks (never trimmed), the total is rounded up to whole tiles, and the growth is shared
 * evenly so the rose stays centred on the pivot. Then no pixel of the rose wraps on any frame (the seed test checks).
 */
function emblemCanvas() {
  const tight = parseEffect({
    canvas: { width: ROSE_SIZE, height: ROSE_SIZE },
    pivot: { x: ROSE_SIZE / 2, y: ROSE_SIZE / 2 },
    angles: { sweep: { from: 0, to: 360, frames: 64 } },
  });
  const { change } = canvasFit(tight, { mask: opaqueMask(compassRose(ROSE_SIZE)) });
  const side = (a: number, b: number) => Math.max(0, a, b);
  const width = roundUp(ROSE_SIZE + 2 * side(change.left, change.right), TILE);
  const height = roundUp(ROSE_SIZE + 2 * side(change.top, change.bottom), TILE);
  return { width, height };
}

const EMBLEM_CANVAS = emblemCanvas();

export const COMPASS_EFFECT = {
  name: "Compass rose emblem",
  description: `The title screen's spinning emblem: the ${ROSE_SIZE} × ${ROSE_SIZE} rose, centred on a ${EMBLEM_CANVAS.width} × ${EMBLEM_CANVAS.height} canvas (${EMBLEM_CANVAS.width / TILE} × ${EMBLEM_CANVAS.height / TILE} tiles), wide enough that no point of the rose wraps on any of the 64 frames.`,
  document: {
    canvas: EMBLEM_CANVAS,
    pivot: { x: EMBLEM_CANVAS.width / 2, y: EMBLEM_CANVAS.height / 2 },
    angles: { sweep: { from: 0, to: 360, frames: 64 } },
    fixedPoint: { bits: 16, fraction: 8 },
    edges: "wrap",
  },
} as const;

/**
 * Kept tight on purpose, to show what wrapping looks like: the picture fills the whole screen, so any tilt pushes its
 * corners over the edges of the wrapping scroll plane and they come back on the opposite side.
 */
export const STORM_EFFECT = {
  name: "Storm background tilt",
  description:
    "Deliberately tight: the harbour picture fills the whole 256 × 224 screen, so at every tilt its corners cross the screen's edges and come back on the opposite side, as the hardware's wrapping scroll plane draws them. The per-frame table counts those wrapped pixels on every frame; nothing wraps only on a canvas of 309 × 274 (the canvas-fit advice), larger than the screen.",
  document: {
    canvas: { width: 256, height: 224 },
    pivot: { x: 128, y: 112 },
    angles: { sweep: { from: -12, to: 12, frames: 48, easing: "ease-in-out", includeEnd: true } },
    fixedPoint: { bits: 16, fraction: 8 },
    edges: "wrap",
    columnGroup: 16,
  },
} as const;

/** Creates the demo unless it is there already; returns whether it created it. */
export async function seedDemo(db: Db): Promise<{ created: boolean; teamId: string }> {
  return db.transaction(async (tx) => {
    // One seeder at a time (two start commands racing on one database).
    await tx.execute(sql`select pg_advisory_xact_lock(hashtext('skewsmith.seed.demo'))`);
    const [existing] = await tx.select().from(teams).where(eq(teams.slug, DEMO_TEAM.slug));
    // Every run brings the demo accounts up to date (makeUser upserts by GitHub id).
    const account = (p: DemoPerson) => makeUser(tx, { githubId: p.githubId, login: p.login, name: p.name, email: p.email });
    for (const p of DEMO_PEOPLE) await account(p);
    if (existing) return { created: false, teamId: existing.id };

    const owner = await account(demoPerson("owner"));
    const editor = await account(demoPerson("editor"));
    const viewer = await account(demoPerson("viewer"));
    const team = await makeTeam(tx, {
      owner,
      name: DEMO_TEAM.name,
      slug: DEMO_TEAM.slug,
      members: [
        { user: editor, role: "editor" },
        { user: viewer, role: "viewer" },
      ],
    });
    const titleScreen = await makeTargetProfile(tx, {
      team,
      actor: owner,
      name: "8-bit title screen",
      description: `Emblem canvas of ${EMBLEM_CANVAS.width} × ${EMBLEM_CANVAS.height} (whole 8 × 8 tiles, room for a turning 32 × 32 sprite), 16-bit coefficients with 8 fraction bits, wrapping like the hardware scroll.`,
      canvasWidth: EMBLEM_CANVAS.width,
      canvasHeight: EMBLEM_CANVAS.height,
      fixedPointBits: 16,
      fixedPointFraction: 8,
      rounding: "nearest-away",
      halfTurn: "flip",
      edges: "wrap",
      columnGroup: 1,
      dialects: ["6502", "bin"],
      labelPrefix: "rose",
    });
    const stormLevel = await makeTargetProfile(tx, {
      team,
      actor: owner,
      name: "16-bit storm level",
      description: "Full 256 × 224 screen; the column pass scrolls columns in groups of 16 pixels.",
      canvasWidth: 256,
      canvasHeight: 224,
      fixedPointBits: 16,
      fixedPointFraction: 8,
      rounding: "nearest-away",
      halfTurn: "flip",
      edges: "wrap",
      columnGroup: 16,
      dialects: ["c", "bin"],
      labelPrefix: "storm",
    });
    const project = await makeProject(tx, { team, actor: owner, ...DEMO_PROJECT });
    const rose = await makeSprite(tx, { project, actor: editor, name: "compass-rose.png", image: compassRose(ROSE_SIZE) });
    const storm = await makeSprite(tx, { project, actor: editor, name: "storm-harbour.png", image: stormBackground(256, 224) });
    await makeEffect(tx, {
      project,
      actor: editor,
      name: COMPASS_EFFECT.name,
      description: COMPASS_EFFECT.description,
      document: COMPASS_EFFECT.document,
      targetProfile: titleScreen,
      sprite: rose,
    });
    await makeEffect(tx, {
      project,
      actor: editor,
      name: STORM_EFFECT.name,
      description: STORM_EFFECT.description,
      document: STORM_EFFECT.document,
      targetProfile: stormLevel,
      sprite: storm,
    });
    return { created: true, teamId: team.id };
  });
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) {
  const url = process.env.DATABASE_URL;
  if (!url) {
    console.error("db:seed: DATABASE_URL is not set (scripts/start and scripts/test set it)");
    process.exit(1);
  }
  const db = createDb(url, { max: 1 });
  try {
    const { created } = await seedDemo(db);
    console.error(
      created ? `db:seed: created the demo team ${DEMO_TEAM.name}` : `db:seed: the demo team ${DEMO_TEAM.name} is already there`,
    );
  } finally {
    await db.$client.end();
  }
}
