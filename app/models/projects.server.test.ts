import { afterAll, describe, expect, it } from "vitest";
import { makeEffect, makeProject, makeTeam, makeUser } from "../../tests/factories.ts";
import { testDb } from "../../tests/support/db.ts";
import { listActivity } from "./activity.server.ts";
import { deleteEffect, renameEffect } from "./effects.server.ts";
import { archiveProject, createProject, listProjects, listProjectsForUser, restoreProject, updateProject } from "./projects.server.ts";

const db = testDb();
afterAll(() => db.$client.end());

async function teamWithOwner() {
  const owner = await makeUser(db);
  return { owner, team: await makeTeam(db, { owner }) };
}

describe("createProject and updateProject", () => {
  it("creates, renames and describes a project, recording each change", async () => {
    const { owner, team } = await teamWithOwner();
    const project = await createProject(db, { teamId: team.id, name: "Harbour", actorId: owner.id });
    await updateProject(db, {
      projectId: project.id,
      name: "Harbour level",
      description: "Level 3",
      expectedVersion: 1,
      actorId: owner.id,
    });
    const [listed] = await listProjects(db, team.id);
    expect(listed).toMatchObject({ name: "Harbour level", description: "Level 3" });
    const summaries = (await listActivity(db, { teamId: team.id, projectId: project.id })).map((a) => a.summary);
    expect(summaries).toEqual(["renamed the project Harbour to Harbour level and changed its description", "created the project Harbour"]);
  });

  it("refuses a second live project with the same name, whatever the letter case", async () => {
    const { owner, team } = await teamWithOwner();
    await createProject(db, { teamId: team.id, name: "Title Screen", actorId: owner.id });
    await expect(createProject(db, { teamId: team.id, name: "title screen", actorId: owner.id })).rejects.toMatchObject({
      field: "name",
      status: 409,
      message: "The team already has a project called “title screen”. Choose another name.",
    });
    const other = await createProject(db, { teamId: team.id, name: "Other", actorId: owner.id });
    await expect(
      updateProject(db, { projectId: other.id, name: "TITLE SCREEN", description: "", expectedVersion: 1, actorId: owner.id }),
    ).rejects.toMatchObject({
      field: "name",
    });
  });

  it("lets two teams use the same project name", async () => {
    const a = await teamWithOwner();
    const b = await teamWithOwner();
    await createProject(db, { teamId: a.team.id, name: "Shared Name", actorId: a.owner.id });
    await expect(createProject(db, { teamId: b.team.id, name: "Shared Name", actorId: b.owner.id })).resolves.toMatchObject({
      name: "Shared Name",
    });
  });
});

describe("archiveProject and restoreProject", () => {
  it("moves a project out of the list and back, keeping its effects", async () => {
    const { owner, team } = await teamWithOwner();
    const project = await makeProject(db, { team, actor: owner, name: "Old demo" });
    await makeEffect(db, { project, actor: owner });
    await archiveProject(db, { projectId: project.id, actorId: owner.id });
    expect(await listProjects(db, team.id)).toEqual([]);
    expect(await listProjects(db, team.id, { archived: true })).toMatchObject([{ id: project.id, effectCount: 1 }]);
    expect((await listProjectsForUser(db, owner.id)).map((p) => p.id)).not.toContain(project.id);
    await restoreProject(db, { projectId: project.id, actorId: owner.id });
    expect(await listProjects(db, team.id)).toMatchObject([{ id: project.id, archivedAt: null, effectCount: 1 }]);
  });

  it("frees the name while archived, and refuses to restore into a clash", async () => {
    const { owner, team } = await teamWithOwner();
    const old = await makeProject(db, { team, actor: owner, name: "Reused" });
    await archiveProject(db, { projectId: old.id, actorId: owner.id });
    await makeProject(db, { team, actor: owner, name: "Reused" });
    await expect(restoreProject(db, { projectId: old.id, actorId: owner.id })).rejects.toThrow(
      /Another project is now called “Reused”. Rename that one first, then restore this one./,
    );
  });

  it("refuses to change an archived project", async () => {
    const { owner, team } = await teamWithOwner();
    const project = await makeProject(db, { team, actor: owner });
    await archiveProject(db, { projectId: project.id, actorId: owner.id });
    await expect(
      updateProject(db, { projectId: project.id, name: "New", description: "", expectedVersion: 1, actorId: owner.id }),
    ).rejects.toThrow(/Restore the project/);
  });
});

describe("listProjects", () => {
  it("counts live effects only and sorts by name, effect count or last change", async () => {
    const { owner, team } = await teamWithOwner();
    const alpha = await makeProject(db, { team, actor: owner, name: "alpha" });
    const beta = await makeProject(db, { team, actor: owner, name: "Beta" });
    const gamma = await makeProject(db, { team, actor: owner, name: "gamma" });
    for (let i = 0; i < 3; i++) await makeEffect(db, { project: beta, actor: owner });
    const gone = await makeEffect(db, { project: alpha, actor: owner });
    await makeEffect(db, { project: alpha, actor: owner });
    await deleteEffect(db, { effectId: gone.id, actorId: owner.id });

    const counts = Object.fromEntries((await listProjects(db, team.id)).map((p) => [p.name, p.effectCount]));
    expect(counts).toEqual({ alpha: 1, Beta: 3, gamma: 0 });

    const names = async (sort: "name" | "effects" | "changed", dir: "asc" | "desc") =>
      (await listProjects(db, team.id, { sort, dir })).map((p) => p.name);
    expect(await names("name", "asc")).toEqual(["alpha", "Beta", "gamma"]);
    expect(await names("name", "desc")).toEqual(["gamma", "Beta", "alpha"]);
    expect(await names("effects", "desc")).toEqual(["Beta", "alpha", "gamma"]);

    // A change to an effect counts as a change to its project.
    const [before] = (await listProjects(db, team.id)).filter((p) => p.id === gamma.id);
    const first = await makeEffect(db, { project: gamma, actor: owner, name: "late" });
    await renameEffect(db, { effectId: first.id, name: "later", expectedVersion: 1, actorId: owner.id });
    expect((await names("changed", "desc"))[0]).toBe("gamma");
    const [after] = (await listProjects(db, team.id)).filter((p) => p.id === gamma.id);
    expect(after.lastChangedAt.getTime()).toBeGreaterThan(before.lastChangedAt.getTime());
  });

  it("shows a person the projects of every team they are in, with their role there", async () => {
    const [a, b] = [await makeUser(db), await makeUser(db)];
    const teamA = await makeTeam(db, { owner: a, members: [{ user: b, role: "viewer" }] });
    const teamB = await makeTeam(db, { owner: b });
    const pa = await makeProject(db, { team: teamA, actor: a });
    const pb = await makeProject(db, { team: teamB, actor: b });
    const mine = await listProjectsForUser(db, b.id);
    expect(mine.map((p) => [p.id, p.role]).sort()).toEqual(
      [
        [pa.id, "viewer"],
        [pb.id, "owner"],
      ].sort(),
    );
    expect((await listProjectsForUser(db, a.id)).map((p) => p.id)).toEqual([pa.id]);
  });
});

describe("updateProject refuses a stale version", () => {
  it("lets exactly one of many saves from one version win and refuses the rest with 409", async () => {
    const { owner, team } = await teamWithOwner();
    const project = await createProject(db, { teamId: team.id, name: "Docks", actorId: owner.id });
    const texts = Array.from({ length: 8 }, (_, i) => `Description ${i}`);
    const results = await Promise.allSettled(
      texts.map((description) =>
        updateProject(db, { projectId: project.id, name: "Docks", description, expectedVersion: 1, actorId: owner.id }),
      ),
    );
    const won = results.flatMap((r, i) => (r.status === "fulfilled" ? [texts[i]] : []));
    expect(won).toHaveLength(1);
    for (const r of results) if (r.status === "rejected") expect(r.reason).toMatchObject({ status: 409, field: "form" });
    const [listed] = await listProjects(db, team.id);
    expect(listed.description).toBe(won[0]);
    const described = (await listActivity(db, { teamId: team.id, projectId: project.id })).filter((a) => a.action === "project.described");
    expect(described).toHaveLength(1);
  });
});
