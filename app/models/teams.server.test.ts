import { sql } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { createDb } from "../db/client.server.ts";
import { makeTeam, makeUser } from "../../tests/factories.ts";
import { testDatabaseUrl, testDb } from "../../tests/support/db.ts";
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
    // The second demotion runs on a connection of its own, so PostgreSQL can tell us when it is really blocked.
    const other = createDb(testDatabaseUrl(), { max: 1 });
    try {
      const pid = (await other.execute<{ pid: number }>(sql`select pg_backend_pid() as pid`)).rows[0].pid;
      let release!: () => void;
      const released = new Promise<void>((r) => (release = r));
      let locked!: () => void;
      const isLocked = new Promise<void>((r) => (locked = r));
      const first = db.transaction(async (tx) => {
        await changeRole(tx, { teamId: team.id, userId: b.id, role: "editor", actorId: a.id });
        locked();
        await released;
      });
      await isLocked;
      const second = Promise.allSettled([changeRole(other, { teamId: team.id, userId: a.id, role: "editor", actorId: b.id })]);
      // Wait until the second transaction waits on the first one's row locks (no guessing with a sleep).
      await expect
        .poll(
          async () =>
            (await db.execute<{ w: string | null }>(sql`select wait_event_type as w from pg_stat_activity where pid = ${pid}`)).rows[0]?.w,
          { timeout: 10_000, interval: 20 },
        )
        .toBe("Lock");
      release();
      await first;
      const [result] = await second;
      expect(result.status).toBe("rejected");
      expect((result as PromiseRejectedResult).reason.message).toMatch(/at least one owner/);
      const roles = (await listMembers(db, team.id)).map((m) => m.role).sort();
      expect(roles).toEqual(["editor", "owner"]);
    } finally {
      await other.$client.end();
    }
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

describe("renameTeam refuses a stale version", () => {
  it("renames from the current version only, and says what the team is now when refused", async () => {
    const owner = await makeUser(db);
    const team = await makeTeam(db, { owner, name: "Harbour Crew" });
    const renamed = await renameTeam(db, { teamId: team.id, name: "Harbour Crew II", expectedVersion: 1, actorId: owner.id });
    expect(renamed.version).toBe(2);
    await expect(renameTeam(db, { teamId: team.id, name: "Late", expectedVersion: 1, actorId: owner.id })).rejects.toMatchObject({
      status: 409,
      field: "name",
      message:
        "Someone changed this team after you opened it (it is now “Harbour Crew II”, version 2; you started from version 1). Reload to see their change, then try again.",
    });
  });

  it("lets exactly one of many renames from the same version win, and records only that one", async () => {
    const owner = await makeUser(db);
    const team = await makeTeam(db, { owner });
    for (const version of [1, 2, 3]) {
      const names = Array.from({ length: 8 }, (_, i) => `Crew v${version} #${i}`);
      const results = await Promise.allSettled(
        names.map((name) => renameTeam(db, { teamId: team.id, name, expectedVersion: version, actorId: owner.id })),
      );
      const won = results.flatMap((r, i) => (r.status === "fulfilled" ? [names[i]] : []));
      expect(won).toHaveLength(1);
      for (const r of results) if (r.status === "rejected") expect(r.reason).toMatchObject({ status: 409 });
      const [mine] = (await listTeamsForUser(db, owner.id)).filter((t) => t.id === team.id);
      expect(mine.name).toBe(won[0]);
    }
    const renames = (await listActivity(db, { teamId: team.id })).filter((a) => a.action === "team.renamed");
    expect(renames).toHaveLength(3);
  });
});

describe("createTeam under a race", () => {
  it("gives teams of one name created at the same moment distinct handles, never a clash", async () => {
    const owner = await makeUser(db);
    const name = `Race Crew ${Date.now().toString(36)}`;
    const teams = await Promise.all(Array.from({ length: 10 }, () => createTeam(db, { name, ownerId: owner.id })));
    expect(new Set(teams.map((t) => t.slug)).size).toBe(10);
  });
});
