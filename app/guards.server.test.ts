import { afterAll, describe, expect, it } from "vitest";
import { makeEffect, makeProject, makeTeam, makeUser } from "../tests/factories.ts";
import { testDb } from "../tests/support/db.ts";
import type { Role, User } from "./db/schema.ts";
import { createGuards } from "./guards.server.ts";
import { eq } from "drizzle-orm";
import { sessions as sessionRows } from "./db/schema.ts";
import { runWithRequest } from "./requestContext.server.ts";
import { createDbSessionStorage, hashSessionId } from "./sessions.server.ts";

const db = testDb();
afterAll(() => db.$client.end());

const sessions = createDbSessionStorage(db, { secrets: ["guards-test-secret-long-enough-to-sign"], secure: false });
const guards = createGuards({ db, sessions });

async function requestAs(user: User | null, path = "/teams/x", method = "GET"): Promise<Request> {
  const headers = new Headers();
  if (user) {
    const session = await sessions.getSession();
    session.set("userId", user.id);
    headers.set("Cookie", (await sessions.commitSession(session)).split(";")[0]);
  }
  return new Request(`http://127.0.0.1${path}`, { method, headers });
}

/** What a guard threw: a redirect, or a status with the message shown to the person. */
async function thrown(promise: Promise<unknown>): Promise<{ status: number; location?: string | null; message?: string }> {
  try {
    await promise;
  } catch (error) {
    if (error instanceof Response) return { status: error.status, location: error.headers.get("Location") };
    const e = error as { init?: { status?: number }; data?: { message?: string } };
    if (e.init?.status) return { status: e.init.status, message: e.data?.message };
    throw error;
  }
  throw new Error("the guard let the request through");
}

describe("requireUser", () => {
  it("sends a visitor without a session to sign-in, remembering the page", async () => {
    const result = await thrown(guards.requireUser(await requestAs(null, "/projects/abc?sort=name")));
    expect(result.status).toBe(302);
    expect(result.location).toBe(`/sign-in?next=${encodeURIComponent("/projects/abc?sort=name")}`);
  });

  it("returns the signed-in person", async () => {
    const user = await makeUser(db);
    expect((await guards.requireUser(await requestAs(user))).id).toBe(user.id);
  });

  it("treats a made-up cookie as signed out", async () => {
    const request = new Request("http://127.0.0.1/", { headers: { Cookie: "skewsmith_session=forged.value" } });
    expect((await thrown(guards.requireUser(request))).status).toBe(302);
  });
});

describe("role guards", () => {
  const roles: Role[] = ["owner", "editor", "viewer"];

  async function world() {
    const owner = await makeUser(db);
    const editor = await makeUser(db);
    const viewer = await makeUser(db);
    const stranger = await makeUser(db);
    const team = await makeTeam(db, {
      owner,
      members: [
        { user: editor, role: "editor" },
        { user: viewer, role: "viewer" },
      ],
    });
    const project = await makeProject(db, { team, actor: owner });
    const effect = await makeEffect(db, { project, actor: owner });
    return { people: { owner, editor, viewer }, stranger, team, project, effect };
  }

  it("lets each role through exactly where its rank is enough, and answers 403 otherwise", async () => {
    const w = await world();
    const rank: Record<Role, number> = { viewer: 0, editor: 1, owner: 2 };
    for (const who of roles)
      for (const needed of roles) {
        const request = await requestAs(w.people[who]);
        // Started one at a time: a refusal that settled before its turn would be an unhandled rejection.
        const checks = [
          () => guards.requireTeamRole(request, w.team.id, needed),
          () => guards.requireProjectRole(request, w.project.id, needed),
          () => guards.requireEffectRole(request, w.effect.id, needed),
        ];
        for (const check of checks) {
          if (rank[who] >= rank[needed]) expect((await check()).role).toBe(who);
          else expect(await thrown(check())).toMatchObject({ status: 403 });
        }
      }
  });

  it("tells a viewer why a change is refused", async () => {
    const w = await world();
    const result = await thrown(guards.requireProjectRole(await requestAs(w.people.viewer, "/p", "POST"), w.project.id, "editor"));
    expect(result).toEqual({
      status: 403,
      message: "Viewers can read but not change anything. Ask an owner of the team to make you an editor.",
    });
    const owners = await thrown(guards.requireTeamRole(await requestAs(w.people.editor), w.team.id, "owner"));
    expect(owners.message).toBe("Only owners can do this; you are an editor in this team.");
  });

  it("answers 404 to someone outside the team, and to ids that do not exist or are malformed", async () => {
    const w = await world();
    const request = await requestAs(w.stranger);
    expect(await thrown(guards.requireTeamRole(request, w.team.id, "viewer"))).toMatchObject({ status: 404 });
    expect(await thrown(guards.requireProjectRole(request, w.project.id, "viewer"))).toMatchObject({ status: 404 });
    expect(await thrown(guards.requireEffectRole(request, w.effect.id, "viewer"))).toMatchObject({ status: 404 });
    const member = await requestAs(w.people.owner);
    expect(await thrown(guards.requireProjectRole(member, "00000000-0000-4000-8000-000000000000", "viewer"))).toMatchObject({
      status: 404,
    });
    expect(await thrown(guards.requireProjectRole(member, "not-a-uuid", "viewer"))).toMatchObject({ status: 404 });
  });

  it("checks sign-in before membership: a visitor is redirected, not told whether the thing exists", async () => {
    const w = await world();
    expect(await thrown(guards.requireProjectRole(await requestAs(null), w.project.id, "viewer"))).toMatchObject({ status: 302 });
  });

  it("reads the person with what it guards when the root and the route ask in the same turn, with the same answers", async () => {
    const w = await world();
    // As a page does: the root loader asks who is signed in, the route's loader guards, both in one request context.
    const page = (request: Request, guard: () => Promise<unknown>) =>
      runWithRequest({ id: "guards-test", method: "GET", path: "/", clientAddress: "127.0.0.1", startedAt: 0 }, () =>
        Promise.allSettled([guards.getUserFromRequest(request), guard()]),
      );
    const asViewer = await requestAs(w.people.viewer);
    const [root, route] = await page(asViewer, () => guards.requireEffectRole(asViewer, w.effect.id, "viewer"));
    expect(root).toMatchObject({ status: "fulfilled", value: { id: w.people.viewer.id } });
    expect(route).toMatchObject({
      status: "fulfilled",
      value: { role: "viewer", effect: { id: w.effect.id }, user: { id: w.people.viewer.id } },
    });
    const [, refused] = await page(asViewer, () => guards.requireProjectRole(asViewer, w.project.id, "editor"));
    expect(refused).toMatchObject({ status: "rejected", reason: { init: { status: 403 } } });
    const asStranger = await requestAs(w.stranger);
    const [stranger, hidden] = await page(asStranger, () => guards.requireTeamRole(asStranger, w.team.id, "viewer"));
    expect(stranger).toMatchObject({ status: "fulfilled", value: { id: w.stranger.id } });
    expect(hidden).toMatchObject({ status: "rejected", reason: { init: { status: 404 } } });
    const visitor = await requestAs(null);
    const [nobody, redirected] = await page(visitor, () => guards.requireEffectRole(visitor, w.effect.id, "viewer"));
    expect(nobody).toMatchObject({ status: "fulfilled", value: null });
    expect(redirected).toMatchObject({ status: "rejected", reason: { status: 302 } });
  });

  it("treats an expired session as signed out, in the guard's own query too", async () => {
    const w = await world();
    const request = await requestAs(w.people.owner);
    const id = (await sessions.getSession(request.headers.get("Cookie"))).id;
    await db
      .update(sessionRows)
      .set({ expiresAt: new Date(Date.now() - 1000) })
      .where(eq(sessionRows.idHash, hashSessionId(id)));
    expect(await thrown(guards.requireEffectRole(request, w.effect.id, "viewer"))).toMatchObject({ status: 302 });
    expect(await thrown(guards.requireTeamRole(request, w.team.id, "viewer"))).toMatchObject({ status: 302 });
  });
});
