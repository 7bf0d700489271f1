import { parseEffect } from "@skewsmith/core";
import { count, eq } from "drizzle-orm";
import type { PgTable } from "drizzle-orm/pg-core";
import { describe, expect, it } from "vitest";
import { withFreshDatabase } from "../../tests/support/db.ts";
import { effects, memberships, projects, sprites, targetProfiles, teams, users } from "../../app/db/schema.ts";
import { DEMO_TEAM } from "../../app/demo/people.ts";
import { listEffects } from "../../app/models/effects.server.ts";
import { listMembers } from "../../app/models/teams.server.ts";
import { decodeIndexedPng } from "../../app/sprites/png.ts";
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
      expect(rose.canvas).toEqual({ width: 32, height: 32 });
      expect(rose.angles).toEqual({ sweep: { from: 0, to: 360, frames: 64, easing: "linear", includeEnd: false } });
      expect(rose.fixedPoint).toEqual({ bits: 16, fraction: 8 }); // Q8.8
      expect(rose.edges).toBe("wrap");

      const storm = parseEffect(byName["Storm background tilt"].document);
      expect(storm.canvas).toEqual({ width: 256, height: 224 });
      expect(storm.angles).toMatchObject({ sweep: { from: -12, to: 12, easing: "ease-in-out" } });
      expect(storm.columnGroup).toBe(16);

      const files = await db.select().from(sprites);
      const roseSprite = files.find((s) => s.name === "compass-rose.png")!;
      const image = decodeIndexedPng(roseSprite.png);
      expect([image.width, image.height, roseSprite.width, roseSprite.height]).toEqual([32, 32, 32, 32]);
      expect(image.palette[0][3]).toBe(0);
      expect(roseSprite.palette).toEqual(image.palette);
    });
  });
});
