import { afterAll, describe, expect, it } from "vitest";
import { makeEffect, makeProject, makeSprite, makeTargetProfile, makeTeam, makeUser } from "../../tests/factories.ts";
import { testDb } from "../../tests/support/db.ts";
import { compassRose } from "../demo/art.ts";
import { listProjectActivityPage, recordActivity } from "./activity.server.ts";
import { deleteEffect } from "./effects.server.ts";
import { getProjectPageLists } from "./projectPage.server.ts";
import { listSprites } from "./sprites.server.ts";
import { listTargetProfiles } from "./targetProfiles.server.ts";

const db = testDb();
afterAll(() => db.$client.end());

/** The three answers the page used to ask for, each from its own function. */
async function separately(ids: { teamId: string; projectId: string }, limit: number) {
  const [profiles, sprites, page] = await Promise.all([
    listTargetProfiles(db, ids.teamId, ids.projectId),
    listSprites(db, ids.projectId),
    listProjectActivityPage(db, ids, 1, limit),
  ]);
  return { profiles, sprites, activity: page.items, activityTotal: page.total };
}

describe("the project page's lists in one query", () => {
  it("are what listTargetProfiles, listSprites and listProjectActivityPage answer", async () => {
    const owner = await makeUser(db, { name: "Keeper of projects" });
    const helper = await makeUser(db, { name: null });
    const team = await makeTeam(db, { owner, members: [{ user: helper, role: "editor" }] });
    const project = await makeProject(db, { team, actor: owner });
    const other = await makeProject(db, { team, actor: owner });
    const wide = await makeTargetProfile(db, { team, actor: owner, name: "b console", canvasWidth: 256, canvasHeight: 224 });
    await makeTargetProfile(db, { team, actor: owner, name: "A handheld", canvasWidth: 160, canvasHeight: 144, maxColours: 4 });
    const rose = await makeSprite(db, { project, actor: owner, image: compassRose(16), name: "rose.png" });
    await makeSprite(db, { project: other, actor: owner, image: compassRose(8), name: "elsewhere.png" });
    await makeEffect(db, { project, actor: owner, name: "Spin", sprite: rose, targetProfile: wide });
    await makeEffect(db, { project: other, actor: owner, name: "Spin elsewhere", targetProfile: wide });
    const gone = await makeEffect(db, { project, actor: helper, name: "Old spin", targetProfile: wide });
    await deleteEffect(db, { effectId: gone.id, actorId: helper.id });
    for (let i = 0; i < 14; i++)
      await recordActivity(db, {
        teamId: team.id,
        projectId: i % 3 ? project.id : null,
        userId: i % 2 ? helper.id : null,
        action: "test.noted",
        summary: `note ${i}`,
      });
    await recordActivity(db, {
      teamId: team.id,
      projectId: other.id,
      userId: owner.id,
      action: "test.noted",
      summary: "another project's",
    });
    const ids = { teamId: team.id, projectId: project.id };

    for (const limit of [12, 100]) {
      const lists = await getProjectPageLists(db, ids, limit);
      expect(lists).toEqual(await separately(ids, limit));
      expect(lists.activity.length).toBe(Math.min(limit, lists.activityTotal));
    }
    const lists = await getProjectPageLists(db, ids, 12);
    expect(lists.profiles.map((p) => [p.name, p.effectCount])).toEqual([
      ["A handheld", 0],
      ["b console", 1],
    ]);
    expect(lists.activityTotal).toBeGreaterThan(14);
    expect(lists.activity.some((a) => a.summary === "another project's")).toBe(false);
    expect(lists.activity[0].createdAt).toBeInstanceOf(Date);
  });

  it("are empty lists for a project that is not there", async () => {
    const owner = await makeUser(db);
    const team = await makeTeam(db, { owner });
    expect(await getProjectPageLists(db, { teamId: team.id, projectId: "00000000-0000-4000-8000-000000000000" }, 12)).toEqual({
      profiles: [],
      sprites: [],
      activity: [],
      activityTotal: 0,
    });
  });
});
