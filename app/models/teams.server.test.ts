import { afterAll, describe, expect, it } from "vitest";
import { makeTeam, makeUser } from "../../tests/factories.ts";
import { testDb } from "../../tests/support/db.ts";
import { listActivity } from "./activity.server.ts";
import { DomainError } from "./errors.ts";
import {
  addMember,
  changeRole,
  createTeam,
  getRole,
  listMembers,
  listTeamsForUser,
  removeMember,
  renameTeam,
  slugify,
} from "./teams.server.ts";

const db = testDb();
afterAll(() => db.$client.end());

describe("slugify", () => {
  it("keeps letters and digits, folds accents and joins words with single dashes", () => {
    expect(slugify("  Tidewell Games! ")).toBe("tidewell-games");
    expect(slugify("Čeština & Co.")).toBe("cestina-co");
    expect(slugify("!!!")).toBe("team");
  });
});

describe("createTeam", () => {
  it("makes the creator the only member, as owner, and records it", async () => {
    const owner = await makeUser(db);
    const team = await createTeam(db, { name: "Night Shift Demos", ownerId: owner.id });
    expect(await listMembers(db, team.id)).toMatchObject([{ userId: owner.id, role: "owner" }]);
    const [activity] = await listActivity(db, { teamId: team.id });
    expect(activity.summary).toBe("created the team Night Shift Demos");
  });

  it("gives a second team of the same name its own handle", async () => {
    const owner = await makeUser(db);
    const name = `Same Name ${Date.now()}`;
    const first = await createTeam(db, { name, ownerId: owner.id });
    const second = await createTeam(db, { name, ownerId: owner.id });
    expect(second.slug).toBe(`${first.slug}-2`);
  });

  it("lists a person's teams with their role and the team's size", async () => {
    const [a, b] = [await makeUser(db), await makeUser(db)];
    const team = await makeTeam(db, { owner: a, name: "Listing Team", members: [{ user: b, role: "viewer" }] });
    const teams = await listTeamsForUser(db, b.id);
    expect(teams).toEqual([expect.objectContaining({ id: team.id, role: "viewer", memberCount: 2, projectCount: 0 })]);
  });
});

describe("changeRole", () => {
  it("changes a member's role", async () => {
    const [owner, member] = [await makeUser(db), await makeUser(db)];
    const team = await makeTeam(db, { owner, members: [{ user: member, role: "viewer" }] });
    await changeRole(db, { teamId: team.id, userId: member.id, role: "editor", actorId: owner.id });
    expect(await getRole(db, team.id, member.id)).toBe("editor");
  });

  it("refuses to demote the last owner, and says what to do instead", async () => {
    const owner = await makeUser(db);
    const team = await makeTeam(db, { owner });
    const attempt = changeRole(db, { teamId: team.id, userId: owner.id, role: "editor", actorId: owner.id });
    await expect(attempt).rejects.toThrow(/A team needs at least one owner: make someone else an owner first/);
    await expect(attempt).rejects.toBeInstanceOf(DomainError);
    expect(await getRole(db, team.id, owner.id)).toBe("owner");
  });

  it("lets one of two owners step down", async () => {
    const [a, b] = [await makeUser(db), await makeUser(db)];
    const team = await makeTeam(db, { owner: a, members: [{ user: b, role: "owner" }] });
    await changeRole(db, { teamId: team.id, userId: a.id, role: "viewer", actorId: a.id });
    expect(await getRole(db, team.id, a.id)).toBe("viewer");
  });

  it("keeps an owner when two owners demote each other at the same moment", async () => {
    const [a, b] = [await makeUser(db), await makeUser(db)];
    const team = await makeTeam(db, { owner: a, members: [{ user: b, role: "owner" }] });
    // Hold the first demotion's transaction open while the second one starts, so they truly overlap.
    let locked!: () => void;
    let release!: () => void;
    const isLocked = new Promise<void>((r) => (locked = r));
    const released = new Promise<void>((r) => (release = r));
    const first = db.transaction(async (tx) => {
      await changeRole(tx, { teamId: team.id, userId: b.id, role: "editor", actorId: a.id });
      locked();
      await released;
    });
    await isLocked;
    const second = changeRole(db, { teamId: team.id, userId: a.id, role: "editor", actorId: b.id });
    const settled = Promise.allSettled([second]);
    await new Promise((r) => setTimeout(r, 200));
    release();
    await first;
    const [result] = await settled;
    expect(result.status).toBe("rejected");
    expect((result as PromiseRejectedResult).reason.message).toMatch(/at least one owner/);
    const roles = (await listMembers(db, team.id)).map((m) => m.role).sort();
    expect(roles).toEqual(["editor", "owner"]);
  });

  it("refuses someone who is not a member", async () => {
    const [owner, stranger] = [await makeUser(db), await makeUser(db)];
    const team = await makeTeam(db, { owner });
    await expect(changeRole(db, { teamId: team.id, userId: stranger.id, role: "viewer", actorId: owner.id })).rejects.toThrow(
      /not a member/,
    );
  });
});

describe("removeMember", () => {
  it("removes a member and records who did it", async () => {
    const [owner, member] = [await makeUser(db, { name: "Removable Person" }), await makeUser(db)];
    const team = await makeTeam(db, { owner, members: [{ user: member, role: "editor" }] });
    await removeMember(db, { teamId: team.id, userId: member.id, actorId: owner.id });
    expect(await getRole(db, team.id, member.id)).toBeNull();
    const [latest] = await listActivity(db, { teamId: team.id });
    expect(latest.action).toBe("member.removed");
    expect(latest.who).toBe("Removable Person");
  });

  it("lets a member leave, but not the last owner", async () => {
    const [owner, member] = [await makeUser(db), await makeUser(db)];
    const team = await makeTeam(db, { owner, members: [{ user: member, role: "viewer" }] });
    await removeMember(db, { teamId: team.id, userId: member.id, actorId: member.id });
    expect(await getRole(db, team.id, member.id)).toBeNull();
    await expect(removeMember(db, { teamId: team.id, userId: owner.id, actorId: owner.id })).rejects.toThrow(
      /You are the team's only owner: make someone else an owner before you leave/,
    );
  });
});

describe("addMember and renameTeam", () => {
  it("refuses to add someone twice and keeps the handle when renaming", async () => {
    const [owner, member] = [await makeUser(db), await makeUser(db)];
    const team = await makeTeam(db, { owner, members: [{ user: member, role: "viewer" }] });
    await expect(addMember(db, { teamId: team.id, userId: member.id, role: "editor", actorId: owner.id })).rejects.toThrow(
      /already a member/,
    );
    await renameTeam(db, { teamId: team.id, name: "Renamed Team", expectedVersion: 1, actorId: owner.id });
    const [mine] = (await listTeamsForUser(db, owner.id)).filter((t) => t.id === team.id);
    expect(mine).toMatchObject({ name: "Renamed Team", slug: team.slug });
  });
});
