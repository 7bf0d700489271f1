import { canvasFit, compileTables, decodePng, opaqueMask, parseEffect } from "@skewsmith/core";
import { count, eq } from "drizzle-orm";
import type { PgTable } from "drizzle-orm/pg-core";
import { describe, expect, it } from "vitest";
import { withFreshDatabase } from "../../tests/support/db.ts";
import { effects, memberships, projects, sprites, targetProfiles, teams, users } from "../../app/db/schema.ts";
import { DEMO_TEAM } from "../../app/demo/people.ts";
import { listEffects } from "../../app/models/effects.server.ts";
import { listMembers } from "../../app/models/teams.server.ts";
import { framePicture, placedSource } from "../../app/effects/frames.ts";
import { spritePlacement } from "../../app/effects/placement.ts";
import { getSpriteImage } from "../../app/models/sprites.server.ts";
import { seedDemo } from "./seed.ts";

describe("seedDemo", () => {
  it("creates the demo scenario of product.md once, and leaves it alone on later runs", async () => {
    await withFreshDatabase(async (db) => {
      const first = await seedDemo(db);
      const second = await seedDemo(db);
      expect(first.created).toBe(true);
      expect(second).toEqual({ created: false, teamId: first.teamId });

      const rows = async (table: PgTable) => (await db.select({ n: count() }).from(table))[0].n;
      expect({
        teams: await rows(teams),
        users: await rows(users),
        memberships: await rows(memberships),
        projects: await rows(projects),
        targetProfiles: await rows(targetProfiles),
        sprites: await rows(sprites),
        effects: await rows(effects),
      }).toEqual({ teams: 1, users: 4, memberships: 3, projects: 1, targetProfiles: 2, sprites: 2, effects: 2 });

      const [team] = await db.select().from(teams).where(eq(teams.id, first.teamId));
      expect(team).toMatchObject({ name: DEMO_TEAM.name, slug: DEMO_TEAM.slug });
      expect((await listMembers(db, team.id)).map((m) => m.role)).toEqual(["owner", "editor", "viewer"]);
    });
  });

  it("seeds the compass-rose emblem and the storm background as product.md describes them", async () => {
    await withFreshDatabase(async (db) => {
      await seedDemo(db);
      const [project] = await db.select().from(projects);
      const byName = Object.fromEntries((await listEffects(db, project.id)).map((e) => [e.name, e]));

      const rose = parseEffect(byName["Compass rose emblem"].document);
      expect(rose.canvas).toEqual({ width: 48, height: 32 });
      expect(rose.pivot).toEqual({ x: 24, y: 16 });
      expect(rose.angles).toEqual({ sweep: { from: 0, to: 360, frames: 64, easing: "linear", includeEnd: false } });
      expect(rose.fixedPoint).toEqual({ bits: 16, fraction: 8 }); // Q8.8
      expect(rose.edges).toBe("wrap");

      const storm = parseEffect(byName["Storm background tilt"].document);
      expect(storm.canvas).toEqual({ width: 256, height: 224 });
      expect(storm.angles).toMatchObject({ sweep: { from: -12, to: 12, easing: "ease-in-out" } });
      expect(storm.columnGroup).toBe(16);

      const files = await db.select().from(sprites);
      const roseSprite = files.find((s) => s.name === "compass-rose.png")!;
      const image = decodePng(roseSprite.png);
      expect([image.width, image.height, roseSprite.width, roseSprite.height, roseSprite.kind]).toEqual([32, 32, 32, 32, "indexed"]);
      if (image.kind !== "indexed") throw new Error("the rose must be indexed");
      expect(image.palette[0][3]).toBe(0);
      expect(roseSprite.palette).toEqual(image.palette);
      expect(roseSprite.byteSize).toBe(roseSprite.png.length);
    });
  });

  it("ships the emblem on a canvas where nothing wraps on any frame, and the storm tilt as the one deliberately tight example", async () => {
    await withFreshDatabase(async (db) => {
      await seedDemo(db);
      const [project] = await db.select().from(projects);
      const all = await db.select().from(effects);
      const effect = (name: string) => all.find((e) => e.name === name)!;

      // The emblem, measured by core over the rose's opaque pixels, as the bench measures a sprite.
      const emblem = effect("Compass rose emblem");
      const emblemDoc = parseEffect(emblem.document);
      const { image: rose } = (await getSpriteImage(db, emblem.spriteId!))!;
      const roseSource = placedSource(emblemDoc, rose, emblem.spriteX, emblem.spriteY);
      const roseMask = opaqueMask(roseSource);
      const emblemTables = compileTables(emblemDoc, { mask: roseMask });
      expect(emblemTables.frames).toHaveLength(64);
      expect(emblemTables.frames.filter((f) => f.wrapped > 0 || f.clipped > 0).map((f) => f.index)).toEqual([]);
      expect(canvasFit(emblemDoc, { mask: roseMask }).fitsNow).toBe(true);
      // Centred, and whole 8 × 8 tiles (an 8-bit target's tile size, from memory of such hardware).
      expect(spritePlacement(emblemDoc.canvas, rose, emblem.spriteX, emblem.spriteY)).toEqual({ x: 8, y: 0, width: 32, height: 32 });
      expect([emblemDoc.canvas.width % 8, emblemDoc.canvas.height % 8]).toEqual([0, 0]);
      // On the rose's own 32 × 32 canvas the points wrap: the growth is needed, not decoration.
      const tight = parseEffect({ ...emblem.document, canvas: { width: 32, height: 32 }, pivot: { x: 16, y: 16 } });
      expect(compileTables(tight, { mask: opaqueMask(rose) }).frames.some((f) => f.wrapped > 0)).toBe(true);
      expect(emblem.description).toContain("no point of the rose wraps");

      // The storm tilt wraps on every frame, as its description says, with the canvas-fit size it names.
      const storm = effect("Storm background tilt");
      const stormDoc = parseEffect(storm.document);
      const { image: harbour } = (await getSpriteImage(db, storm.spriteId!))!;
      const stormMask = opaqueMask(placedSource(stormDoc, harbour, storm.spriteX, storm.spriteY));
      expect(compileTables(stormDoc, { mask: stormMask }).frames.every((f) => f.wrapped > 0)).toBe(true);
      const fit = canvasFit(stormDoc, { mask: stormMask });
      expect(storm.description).toMatch(/^Deliberately tight/);
      expect(storm.description).toContain(`${fit.width} × ${fit.height}`);

      // The harbour as stored: index 0 of its palette is the transparent background and no pixel of the picture uses
      // it, so every pixel of the picture is opaque (the mask is the whole screen).
      const [stormRow] = await db.select().from(sprites).where(eq(sprites.id, storm.spriteId!));
      const stored = decodePng(stormRow.png);
      if (stored.kind !== "indexed") throw new Error("the harbour must be indexed");
      expect([stored.width, stored.height]).toEqual([256, 224]);
      expect(stored.palette[0]).toEqual([0, 0, 0, 0]);
      expect(stored.palette.slice(1).every((c) => c[3] === 255)).toBe(true);
      expect(stored.data.includes(0)).toBe(false);
      expect(stormRow.palette).toEqual(stored.palette);
      // On the canvas the advice names, the tilted harbour's last frame sits over a transparent background: exactly the
      // pixels the picture does not cover are index 0 (wrap moves pixels, never drops them).
      const grown = parseEffect({
        ...storm.document,
        canvas: { width: fit.width, height: fit.height },
        pivot: { x: fit.width / 2, y: fit.height / 2 },
      });
      const last = framePicture(grown, placedSource(grown, stored, null, null), 47, 3);
      if (last.kind !== "indexed") throw new Error("the frame of an indexed sprite must be indexed");
      expect(last.palette).toEqual(stored.palette);
      const background = last.data.reduce((n, i) => n + (i === 0 ? 1 : 0), 0);
      expect(background).toBe(fit.width * fit.height - 256 * 224);
      expect([0, fit.width - 1, (fit.height - 1) * fit.width, fit.width * fit.height - 1].map((i) => last.data[i])).toEqual([0, 0, 0, 0]);

      // The target profile the emblem follows has the emblem's canvas.
      const [profile] = await db.select().from(targetProfiles).where(eq(targetProfiles.id, emblem.targetProfileId!));
      expect([profile.canvasWidth, profile.canvasHeight]).toEqual([emblemDoc.canvas.width, emblemDoc.canvas.height]);
      expect(project.description).toContain("kept tight on purpose");
    });
  });
});
