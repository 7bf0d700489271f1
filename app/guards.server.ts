/**
 * Guards run first in every loader and action. Not signed in: a redirect to the sign-in page.
 * Signed in but not a member: 404 (we do not confirm that the thing exists). A member whose role is
 * too low: 403. Each returns what the route needs next (the user, the team, the role…).
 */
import { and, eq, gt, sql } from "drizzle-orm";
import { data, redirect, type SessionStorage } from "react-router";
import type { Db } from "./db/client.server.ts";
import {
  effects,
  memberships,
  projects,
  sessions,
  teams,
  users,
  type EffectRow,
  type Project,
  type Role,
  type Team,
  type User,
} from "./db/schema.ts";
import { db } from "./db.server.ts";
import { getUser } from "./models/users.server.ts";
import { currentRequest, type RequestInfo } from "./requestContext.server.ts";
import { hasRole } from "./roles.ts";
import { sessionStorage, type DbSessionStorage, type SessionData } from "./sessions.server.ts";

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** True for a well-formed UUID (any other id is answered 404 before anything is looked up). */
export function isUuid(value: unknown): value is string {
  return typeof value === "string" && UUID.test(value);
}

/**
 * The one answer to "not there" and "not yours", whatever the thing and wherever it is asked for (pages, files,
 * the API): the same status and the same words, so an id cannot be probed (docs/decisions/0002).
 */
export const NOT_FOUND_MESSAGE = "There is nothing here, or it belongs to a team you are not in.";

/** Throws the one 404 answer. */
export function notFound(): never {
  throw data({ message: NOT_FOUND_MESSAGE }, { status: 404 });
}

/** The message of a 403, in the words a person can act on. */
export function forbiddenMessage(role: Role, needed: Role): string {
  return needed === "owner"
    ? `Only owners can do this; you are ${role === "editor" ? "an editor" : "a viewer"} in this team.`
    : `Viewers can read but not change anything. Ask an owner of the team to make you an editor.`;
}

function forbid(role: Role, needed: Role): never {
  throw data({ message: forbiddenMessage(role, needed) }, { status: 403 });
}

/** Where to come back to after signing in: the path of a GET, the page itself for anything else. */
function returnPath(request: Request): string {
  const url = new URL(request.url);
  const path = url.pathname.replace(/\.data$/, "");
  return request.method === "GET" ? `${path}${url.search}` : path;
}

export function createGuards(deps: { db: Db; sessions: SessionStorage<SessionData> | DbSessionStorage }) {
  async function lookUpUser(cookie: string | null): Promise<User | null> {
    if (!cookie) return null;
    // One signed-cookie check and one query when the storage can (the app's own); else the session, then the user.
    if ("readUser" in deps.sessions) return deps.sessions.readUser(cookie);
    const session = await deps.sessions.getSession(cookie);
    const userId = session.get("userId");
    return typeof userId === "string" ? getUser(deps.db, userId) : null;
  }

  /**
   * The request's memo of the session lookup for `cookie`. The lookup of its own starts a turn of the event loop
   * later, so that a guard asking in the same turn (the route's loader runs beside the root's) can claim it and read
   * the person in the same query as what it guards: one round trip fewer on every page behind a guard.
   */
  function memoOf(info: RequestInfo, cookie: string | null) {
    const old = info.session;
    if (old && old.cookie === cookie) return old as typeof old & { user: Promise<User | null> };
    let settle!: (user: Promise<User | null>) => void;
    let claimed = false;
    const memo = {
      cookie,
      user: new Promise<User | null>((resolve) => (settle = resolve)),
      claim: () => {
        if (claimed) return null;
        claimed = true;
        return settle as (user: Promise<unknown>) => void;
      },
    };
    // A failed lookup is answered by whoever awaits it; nobody may (a resource route has no root loader).
    memo.user.catch(() => {});
    setImmediate(() => memo.claim()?.(lookUpUser(cookie)));
    info.session = memo;
    return memo;
  }

  /** The signed-in person, looked up once per request (the root and the route both ask), and noted for the log. */
  async function getUserFromRequest(request: Request): Promise<User | null> {
    const cookie = request.headers.get("Cookie");
    const info = currentRequest();
    const found = await (info ? memoOf(info, cookie).user : lookUpUser(cookie));
    if (found && info) info.userId = found.id;
    return found;
  }

  function signInFirst(request: Request): never {
    throw redirect(`/sign-in?next=${encodeURIComponent(returnPath(request))}`);
  }

  async function requireUser(request: Request): Promise<User> {
    const user = await getUserFromRequest(request);
    if (!user) signInFirst(request);
    return user;
  }

  // The guards' lookups run on every request: prepared once per connection, each one round trip.
  const teamWithRole = deps.db
    .select({ team: teams, role: memberships.role })
    .from(teams)
    .innerJoin(memberships, and(eq(memberships.teamId, teams.id), eq(memberships.userId, sql.placeholder("userId"))))
    .where(eq(teams.id, sql.placeholder("id")))
    .prepare("skewsmith_guard_team");
  const projectWithRole = deps.db
    .select({ project: projects, team: teams, role: memberships.role })
    .from(projects)
    .innerJoin(teams, eq(teams.id, projects.teamId))
    .innerJoin(memberships, and(eq(memberships.teamId, projects.teamId), eq(memberships.userId, sql.placeholder("userId"))))
    .where(eq(projects.id, sql.placeholder("id")))
    .prepare("skewsmith_guard_project");
  const effectWithRole = deps.db
    .select({ effect: effects, project: projects, team: teams, role: memberships.role })
    .from(effects)
    .innerJoin(projects, eq(projects.id, effects.projectId))
    .innerJoin(teams, eq(teams.id, projects.teamId))
    .innerJoin(memberships, and(eq(memberships.teamId, projects.teamId), eq(memberships.userId, sql.placeholder("userId"))))
    .where(eq(effects.id, sql.placeholder("id")))
    .prepare("skewsmith_guard_effect");

  // The same, with the person read from the session in the same query (see memoOf): no row when the session is not a
  // live one; a row without a role when the person is not a member or the thing is not there.
  const liveSession = and(eq(sessions.idHash, sql.placeholder("idHash")), gt(sessions.expiresAt, sql`now()`));
  const teamBySession = deps.db
    .select({ user: users, team: teams, role: memberships.role })
    .from(sessions)
    .innerJoin(users, eq(users.id, sessions.userId))
    .leftJoin(teams, eq(teams.id, sql.placeholder("id")))
    .leftJoin(memberships, and(eq(memberships.teamId, teams.id), eq(memberships.userId, users.id)))
    .where(liveSession)
    .prepare("skewsmith_guard_team_session");
  const projectBySession = deps.db
    .select({ user: users, project: projects, team: teams, role: memberships.role })
    .from(sessions)
    .innerJoin(users, eq(users.id, sessions.userId))
    .leftJoin(projects, eq(projects.id, sql.placeholder("id")))
    .leftJoin(teams, eq(teams.id, projects.teamId))
    .leftJoin(memberships, and(eq(memberships.teamId, projects.teamId), eq(memberships.userId, users.id)))
    .where(liveSession)
    .prepare("skewsmith_guard_project_session");
  const effectBySession = deps.db
    .select({ user: users, effect: effects, project: projects, team: teams, role: memberships.role })
    .from(sessions)
    .innerJoin(users, eq(users.id, sessions.userId))
    .leftJoin(effects, eq(effects.id, sql.placeholder("id")))
    .leftJoin(projects, eq(projects.id, effects.projectId))
    .leftJoin(teams, eq(teams.id, projects.teamId))
    .leftJoin(memberships, and(eq(memberships.teamId, projects.teamId), eq(memberships.userId, users.id)))
    .where(liveSession)
    .prepare("skewsmith_guard_effect_session");

  /**
   * The person and the guarded row in one query, when the storage can and nobody has looked the person up yet for
   * this request; null otherwise (the caller then checks the person first, the thing after). Not signed in: the
   * redirect to sign-in, as requireUser, before anything about the thing is told.
   */
  async function bySession<Row extends { user: User }>(
    request: Request,
    id: string | undefined,
    query: { execute(values: { id: string; idHash: string }): Promise<Row[]> },
  ): Promise<Row | null> {
    const storage = deps.sessions;
    if (!isUuid(id) || !("sessionKey" in storage)) return null;
    const cookie = request.headers.get("Cookie");
    const info = currentRequest();
    const settle = info ? memoOf(info, cookie).claim?.() : () => {};
    if (!settle) return null;
    const found = (async () => {
      const idHash = await storage.sessionKey(cookie);
      return idHash === null ? undefined : (await query.execute({ id, idHash }))[0];
    })();
    settle(found.then((row) => row?.user ?? null));
    const row = await found;
    if (!row) signInFirst(request);
    if (info) info.userId = row.user.id;
    return row;
  }

  function check(role: Role | null, needed: Role): asserts role is Role {
    if (!role) notFound();
    if (!hasRole(role, needed)) forbid(role, needed);
  }

  // The checks below take a person already known (from a session or, in the API, a token), so every way in shares them.

  async function teamAccess(user: User, teamId: string | undefined, needed: Role): Promise<{ user: User; team: Team; role: Role }> {
    if (!isUuid(teamId)) notFound();
    const [row] = await teamWithRole.execute({ id: teamId, userId: user.id });
    check(row?.role ?? null, needed);
    return { user, team: row.team, role: row.role };
  }

  async function projectAccess(
    user: User,
    projectId: string | undefined,
    needed: Role,
  ): Promise<{ user: User; team: Team; project: Project; role: Role }> {
    if (!isUuid(projectId)) notFound();
    const [row] = await projectWithRole.execute({ id: projectId, userId: user.id });
    check(row?.role ?? null, needed);
    return { user, team: row.team, project: row.project, role: row.role };
  }

  async function effectAccess(
    user: User,
    effectId: string | undefined,
    needed: Role,
  ): Promise<{ user: User; team: Team; project: Project; effect: EffectRow; role: Role }> {
    if (!isUuid(effectId)) notFound();
    const [row] = await effectWithRole.execute({ id: effectId, userId: user.id });
    check(row?.role ?? null, needed);
    return { user, team: row.team, project: row.project, effect: row.effect, role: row.role };
  }

  async function requireTeamRole(
    request: Request,
    teamId: string | undefined,
    needed: Role,
  ): Promise<{ user: User; team: Team; role: Role }> {
    const row = await bySession(request, teamId, teamBySession);
    if (!row) return teamAccess(await requireUser(request), teamId, needed);
    check(row.role, needed);
    return { user: row.user, team: row.team!, role: row.role };
  }

  async function requireProjectRole(
    request: Request,
    projectId: string | undefined,
    needed: Role,
  ): Promise<{ user: User; team: Team; project: Project; role: Role }> {
    const row = await bySession(request, projectId, projectBySession);
    if (!row) return projectAccess(await requireUser(request), projectId, needed);
    check(row.role, needed);
    return { user: row.user, team: row.team!, project: row.project!, role: row.role };
  }

  async function requireEffectRole(
    request: Request,
    effectId: string | undefined,
    needed: Role,
  ): Promise<{ user: User; team: Team; project: Project; effect: EffectRow; role: Role }> {
    const row = await bySession(request, effectId, effectBySession);
    if (!row) return effectAccess(await requireUser(request), effectId, needed);
    check(row.role, needed);
    return { user: row.user, team: row.team!, project: row.project!, effect: row.effect!, role: row.role };
  }

  return {
    getUserFromRequest,
    requireUser,
    requireTeamRole,
    requireProjectRole,
    requireEffectRole,
    teamAccess,
    projectAccess,
    effectAccess,
  };
}

type Guards = ReturnType<typeof createGuards>;
let guards: Guards | undefined;
const app = (): Guards => (guards ??= createGuards({ db: db(), sessions: sessionStorage() }));

/** The signed-in person, or null. */
export const getUserFromRequest: Guards["getUserFromRequest"] = (request) => app().getUserFromRequest(request);
/** The signed-in person; otherwise a redirect to sign-in that comes back here. */
export const requireUser: Guards["requireUser"] = (request) => app().requireUser(request);
/** A member of the team with at least the role `needed`; otherwise 404 (not a member) or 403 (role too low). */
export const requireTeamRole: Guards["requireTeamRole"] = (request, teamId, needed) => app().requireTeamRole(request, teamId, needed);
/** A member of the project's team with at least the role `needed`; otherwise 404 or 403. */
export const requireProjectRole: Guards["requireProjectRole"] = (request, projectId, needed) =>
  app().requireProjectRole(request, projectId, needed);
/** A member of the effect's team with at least the role `needed`; otherwise 404 or 403. */
export const requireEffectRole: Guards["requireEffectRole"] = (request, effectId, needed) =>
  app().requireEffectRole(request, effectId, needed);
/** `user` as a member of the team with at least the role `needed`; otherwise 404 (not a member) or 403 (role too low). */
export const teamAccess: Guards["teamAccess"] = (user, teamId, needed) => app().teamAccess(user, teamId, needed);
/** `user` as a member of the project's team with at least the role `needed`; otherwise 404 or 403. */
export const projectAccess: Guards["projectAccess"] = (user, projectId, needed) => app().projectAccess(user, projectId, needed);
/** `user` as a member of the effect's team with at least the role `needed`; otherwise 404 or 403. */
export const effectAccess: Guards["effectAccess"] = (user, effectId, needed) => app().effectAccess(user, effectId, needed);
