/**
 * A target profile's colour limit holds wherever an effect and a sprite meet under it: when an effect is made with
 * both, and when the limit is lowered below a sprite already in use (the bench save and a sprite's replacement are
 * checked in effects.bench.test.ts and sprites.server.test.ts).
 */
import { eq } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { makeEffect, makeProject, makeSprite, makeTargetProfile, makeTeam, makeUser } from "../../tests/factories.ts";
import { testDb } from "../../tests/support/db.ts";
import { effects, type TargetProfile } from "../db/schema.ts";
import { compassRose } from "../demo/art.ts";
import { spriteColours } from "../sprites/colours.ts";
import { deleteEffect } from "./effects.server.ts";
import { DomainError } from "./errors.ts";
import { getTargetProfile, updateTargetProfile } from "./targetProfiles.server.ts";

const db = testDb();
afterAll(() => db.$client.end());

/** The factories' sprite is compassRose(16); its colours are counted by spriteColours (checked in colours.test.ts). */
const COLOURS = spriteColours(compassRose(16));

async function setup(maxColours: number | null) {
  const owner = await makeUser(db);
  const team = await makeTeam(db, { owner });
  const project = await makeProject(db, { team, actor: owner });
  const sprite = await makeSprite(db, { project, actor: owner });
  const profile = await makeTargetProfile(db, { team, actor: owner, name: `Limit ${maxColours}`, maxColours });
  return { owner, team, project, sprite, profile };
}

const refusal = (p: Promise<unknown>) =>
  p.then(
    () => {
      throw new Error("expected a refusal");
    },
    (e: unknown) => e as DomainError,
  );

function settings(profile: TargetProfile, changes: Partial<TargetProfile>) {
  const { id: _i, teamId: _t, version: _v, createdAt: _c, updatedAt: _u, ...rest } = { ...profile, ...changes };
  return rest;
}

describe("colour limits", () => {
  it("needs a sprite of more than two colours to mean anything", () => {
    expect(COLOURS).toBeGreaterThan(3);
  });

  it("refuses a new effect whose sprite has more colours than its target profile allows; nothing is made", async () => {
    const { owner, project, sprite, profile } = await setup(COLOURS - 1);
    const error = await refusal(makeEffect(db, { project, actor: owner, sprite, targetProfile: profile }));
    expect(error).toBeInstanceOf(DomainError);
    expect(error.status).toBe(400);
    expect(error.field).toBe("spriteId");
    expect(error.message).toContain(`uses ${COLOURS} colours (the background included)`);
    expect(error.message).toContain(`allows at most ${COLOURS - 1}`);
    expect(await db.select().from(effects).where(eq(effects.projectId, project.id))).toEqual([]);
  });

  it("makes a new effect whose sprite fits the limit exactly", async () => {
    const { owner, project, sprite, profile } = await setup(COLOURS);
    const effect = await makeEffect(db, { project, actor: owner, sprite, targetProfile: profile });
    expect(effect.spriteId).toBe(sprite.id);
  });

  it("refuses to lower a limit below a sprite in use, naming the field, the sprite, the effect and what is allowed; nothing changes", async () => {
    const { owner, team, project, sprite, profile } = await setup(null);
    const effect = await makeEffect(db, { project, actor: owner, sprite, targetProfile: profile, name: "Title spin" });
    const lower = (maxColours: number, expectedVersion: number) =>
      updateTargetProfile(db, {
        ...settings(profile, { maxColours }),
        teamId: team.id,
        profileId: profile.id,
        expectedVersion,
        actorId: owner.id,
      });
    const error = await refusal(lower(COLOURS - 1, 1));
    expect(error.status).toBe(400);
    expect(error.field).toBe("maxColours");
    expect(error.message).toBe(
      `Colour limit ${COLOURS - 1} is below the ${COLOURS} colours (the background included) of the sprite ${sprite.name}, which the effect Title spin uses with this profile: allowed ${COLOURS} to 256 while it does, or none. Reduce the sprite's colours first.`,
    );
    expect(await getTargetProfile(db, profile.id)).toMatchObject({ version: 1, maxColours: null });

    // Down to exactly what the sprite needs is fine; once the effect is deleted, lower still.
    expect((await lower(COLOURS, 1)).profile.maxColours).toBe(COLOURS);
    await refusal(lower(2, 2));
    await deleteEffect(db, { effectId: effect.id, actorId: owner.id });
    expect((await lower(2, 2)).profile.maxColours).toBe(2);
  });
});
