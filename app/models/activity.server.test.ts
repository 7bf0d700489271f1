import { afterAll, describe, expect, it } from "vitest";
import { makeEffect, makeProject, makeTargetProfile, makeTeam, makeUser } from "../../tests/factories.ts";
import { testDb } from "../../tests/support/db.ts";
import { isActivityKind, listProjectActivityPage } from "./activity.server.ts";
import { renameEffect } from "./effects.server.ts";

const db = testDb();
afterAll(() => db.$client.end());

describe("listProjectActivityPage", () => {
  it("pages a project's changes and the team's own, newest first, without the other projects'", async () => {
    const owner = await makeUser(db);
    const team = await makeTeam(db, { owner });
    const project = await makeProject(db, { team, actor: owner, name: "Quay" });
    const other = await makeProject(db, { team, actor: owner, name: "Elsewhere" });
    await makeEffect(db, { project: other, actor: owner, name: "Not here" });
    const effect = await makeEffect(db, { project, actor: owner, name: "Spin 0" });
    for (let i = 1; i <= 5; i++) await renameEffect(db, { effectId: effect.id, name: `Spin ${i}`, expectedVersion: i, actorId: owner.id });
    await makeTargetProfile(db, { team, actor: owner, name: "Team-wide" });

    const first = await listProjectActivityPage(db, { teamId: team.id, projectId: project.id }, 1, 4);
    // team.created, project.created (Quay), effect.created, 5 renames, target_profile.created: 9 rows.
    expect(first).toMatchObject({ page: 1, pages: 3, total: 9 });
    expect(first.items.map((i) => i.summary)).toEqual([
      "created the target profile Team-wide",
      "renamed the effect Spin 4 to Spin 5",
      "renamed the effect Spin 3 to Spin 4",
      "renamed the effect Spin 2 to Spin 3",
    ]);
    const last = await listProjectActivityPage(db, { teamId: team.id, projectId: project.id }, 3, 4);
    expect(last.items.map((i) => i.action)).toEqual(["team.created"]);
    expect(last).toMatchObject({ page: 3, pages: 3, total: 9 });
    // Past the end no row carries the count; it is still the count of all 9.
    expect(await listProjectActivityPage(db, { teamId: team.id, projectId: project.id }, 7, 4)).toMatchObject({
      items: [],
      pages: 3,
      total: 9,
    });
    const all = [1, 2, 3].map((p) => listProjectActivityPage(db, { teamId: team.id, projectId: project.id }, p, 4));
    const summaries = (await Promise.all(all)).flatMap((p) => p.items.map((i) => i.summary));
    expect(new Set(summaries).size).toBe(9);
    expect(summaries.join("\n")).not.toContain("Not here");
    expect(summaries.join("\n")).not.toContain("Elsewhere");

    const profiles = await listProjectActivityPage(db, { teamId: team.id, projectId: project.id, kind: "profiles" }, 1);
    expect(profiles.items.map((i) => i.action)).toEqual(["target_profile.created"]);
    const members = await listProjectActivityPage(db, { teamId: team.id, projectId: project.id, kind: "members" }, 1);
    expect(members.items.map((i) => i.action)).toEqual(["team.created"]);
    const empty = await listProjectActivityPage(db, { teamId: team.id, projectId: project.id, kind: "tokens" }, 1);
    expect(empty).toMatchObject({ items: [], pages: 1, total: 0 });
  });

  it("knows its kinds and nothing of an object's prototype", () => {
    expect(isActivityKind("effects")).toBe(true);
    for (const key of ["__proto__", "constructor", "toString", "hasOwnProperty", ""]) expect(isActivityKind(key)).toBe(false);
  });
});
