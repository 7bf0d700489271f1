import { afterAll, describe, expect, it } from "vitest";
import { makeEffect, makeProject, makeSprite, makeTargetProfile, makeTeam, makeUser } from "../../tests/factories.ts";
import { testDb } from "../../tests/support/db.ts";
import type { TargetProfile } from "../db/schema.ts";
import { compassRose } from "../demo/art.ts";
import { getEffectPageLists } from "./effectPage.server.ts";
import { deleteEffect } from "./effects.server.ts";
import { listSprites, renameSprite } from "./sprites.server.ts";
import { getEffectChanges } from "./effectChanges.server.ts";
import { listTargetProfiles, updateTargetProfile } from "./targetProfiles.server.ts";

const db = testDb();
afterAll(() => db.$client.end());

/** The fields of a profile the effect page uses, from listTargetProfiles' full rows. */
const benchFields = (p: TargetProfile) => ({
  id: p.id,
  name: p.name,
  canvasWidth: p.canvasWidth,
  canvasHeight: p.canvasHeight,
  fixedPointBits: p.fixedPointBits,
  fixedPointFraction: p.fixedPointFraction,
  rounding: p.rounding,
  halfTurn: p.halfTurn,
  edges: p.edges,
  columnGroup: p.columnGroup,
  dialects: p.dialects,
  labelPrefix: p.labelPrefix,
  exportOptions: p.exportOptions,
});

/** The three answers the page used to ask for, each from its own function. */
async function separately(ids: { teamId: string; projectId: string; effectId: string }) {
  const [profiles, sprites, changes] = await Promise.all([
    listTargetProfiles(db, ids.teamId),
    listSprites(db, ids.projectId),
    getEffectChanges(db, ids.effectId),
  ]);
  return { profiles: profiles.map(benchFields), sprites, ...changes };
}

describe("the effect page's lists in one query", () => {
  it("are what listTargetProfiles, listSprites and getEffectChanges answer, before and after a profile change", async () => {
    const owner = await makeUser(db, { name: "Saver of effects" });
    const team = await makeTeam(db, { owner });
    const project = await makeProject(db, { team, actor: owner });
    const other = await makeProject(db, { team, actor: owner });
    const profile = await makeTargetProfile(db, {
      team,
      actor: owner,
      name: "b handheld",
      canvasWidth: 160,
      canvasHeight: 144,
      dialects: ["c", "6502"],
      labelPrefix: "spin",
      exportOptions: { registerBits: 8 },
    });
    await makeTargetProfile(db, { team, actor: owner, name: "A console", canvasWidth: 256, canvasHeight: 224 });
    const rose = await makeSprite(db, { project, actor: owner, image: compassRose(16), name: "rose.png" });
    const small = await makeSprite(db, { project, actor: owner, image: compassRose(8), name: "Another.png" });
    await makeSprite(db, { project: other, actor: owner, image: compassRose(8), name: "elsewhere.png" });
    const effect = await makeEffect(db, { project, actor: owner, name: "Spin", sprite: rose, targetProfile: profile });
    const gone = await makeEffect(db, { project, actor: owner, name: "Old spin", sprite: rose });
    await deleteEffect(db, { effectId: gone.id, actorId: owner.id });
    await renameSprite(db, {
      projectId: project.id,
      spriteId: small.id,
      actorId: owner.id,
      name: "another.png",
      expectedVersion: small.version,
    });
    const ids = { teamId: team.id, projectId: project.id, effectId: effect.id };

    const before = await getEffectPageLists(db, ids);
    expect(before).toEqual(await separately(ids));
    expect(before.profiles.map((p) => p.name)).toEqual(["A console", "b handheld"]);
    expect(before.sprites.map((s) => s.name)).toEqual(["another.png", "rose.png"]);
    expect(before.sprites[1].usedBy.map((u) => [u.name, u.deleted])).toEqual([
      ["Old spin", true],
      ["Spin", false],
    ]);
    expect(before.profileChange).toBeNull();

    const { id: _i, teamId: _t, version: _v, createdAt: _c, updatedAt: _u, ...settings } = profile;
    await updateTargetProfile(db, {
      ...settings,
      canvasWidth: 192,
      teamId: team.id,
      profileId: profile.id,
      expectedVersion: 1,
      actorId: owner.id,
    });
    const after = await getEffectPageLists(db, ids);
    expect(after).toEqual(await separately(ids));
    expect(after.profileChange).toMatchObject({ profileId: profile.id, profileVersion: 2 });
    expect(after.sprites[0].createdAt).toBeInstanceOf(Date);
  });

  it("are empty for an effect that is not there, and for a project without sprites or a team without profiles", async () => {
    const owner = await makeUser(db);
    const team = await makeTeam(db, { owner });
    const project = await makeProject(db, { team, actor: owner });
    const effect = await makeEffect(db, { project, actor: owner });
    const ids = { teamId: team.id, projectId: project.id, effectId: effect.id };
    expect(await getEffectPageLists(db, ids)).toEqual(await separately(ids));
    expect(await getEffectPageLists(db, { ...ids, effectId: "00000000-0000-4000-8000-000000000000" })).toEqual({
      profiles: [],
      sprites: [],
      updatedBy: null,
      profileChange: null,
    });
  });
});
