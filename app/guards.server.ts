/**
 * Guards run first in every loader and action. Not signed in: a redirect to the sign-in page.
 * Signed in but not a member: 404 (we do not confirm that the thing exists). A member whose role is
 * too low: 403. Each returns what the route needs next (the user, the team, the role…).
 */
import { data, redirect, type SessionStorage } from "react-router";
import type { Db } from "./db/client.server.ts";
import type { EffectRow, Project, Role, Team, User } from "./db/schema.ts";
import { db } from "./db.server.ts";
import { getEffect } from "./models/effects.server.ts";
import { getProject } from "./models/projects.server.ts";
import { getRole, getTeam } from "./models/teams.server.ts";
import { getUser } from "./models/users.server.ts";
import { hasRole } from "./roles.ts";
import { sessionStorage, type SessionData } from "./sessions.server.ts";

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** The message of a 403, in the words a person can act on. */
export function forbiddenMessage(role: Role, needed: Role): string {
  return needed === "owner"
    ? `Only owners can do this; you are ${role === "editor" ? "an editor" : "a viewer"} in this team.`
    : `Viewers can read but not change anything. Ask an owner of the team to make you an editor.`;
}

function notFound(what: string): never {
  throw data({ message: `This ${what} does not exist, or you are not a member of its team.` }, { status: 404 });
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

export function createGuards(deps: { db: Db; sessions: SessionStorage<SessionData> }) {
  async function getUserFromRequest(request: Request): Promise<User | null> {
    const session = await deps.sessions.getSession(request.headers.get("Cookie"));
    const userId = session.get("userId");
    return userId ? getUser(deps.db, userId) : null;
  }

  async function requireUser(request: Request): Promise<User> {
    const user = await getUserFromRequest(request);
    if (!user) throw redirect(`/sign-in?next=${encodeURIComponent(returnPath(request))}`);
    return user;
  }

  // The checks below take a person already known (from a session or, in the API, a token), so every way in shares them.

  async function teamAccess(user: User, teamId: string | undefined, needed: Role): Promise<{ user: User; team: Team; role: Role }> {
    if (!teamId || !UUID.test(teamId)) notFound("team");
    const role = await getRole(deps.db, teamId, user.id);
    const team = role ? await getTeam(deps.db, teamId) : null;
    if (!role || !team) notFound("team");
    if (!hasRole(role, needed)) forbid(role, needed);
    return { user, team, role };
  }

  async function projectAccess(
    user: User,
    projectId: string | undefined,
    needed: Role,
  ): Promise<{ user: User; team: Team; project: Project; role: Role }> {
    if (!projectId || !UUID.test(projectId)) notFound("project");
    const project = await getProject(deps.db, projectId);
    const role = project ? await getRole(deps.db, project.teamId, user.id) : null;
    const team = project && role ? await getTeam(deps.db, project.teamId) : null;
    if (!project || !role || !team) notFound("project");
    if (!hasRole(role, needed)) forbid(role, needed);
    return { user, team, project, role };
  }

  async function effectAccess(
    user: User,
    effectId: string | undefined,
    needed: Role,
  ): Promise<{ user: User; team: Team; project: Project; effect: EffectRow; role: Role }> {
    if (!effectId || !UUID.test(effectId)) notFound("effect");
    const effect = await getEffect(deps.db, effectId);
    const project = effect ? await getProject(deps.db, effect.projectId) : null;
    const role = project ? await getRole(deps.db, project.teamId, user.id) : null;
    const team = project && role ? await getTeam(deps.db, project.teamId) : null;
    if (!effect || !project || !role || !team) notFound("effect");
    if (!hasRole(role, needed)) forbid(role, needed);
    return { user, team, project, effect, role };
  }

  async function requireTeamRole(request: Request, teamId: string | undefined, needed: Role) {
    return teamAccess(await requireUser(request), teamId, needed);
  }

  async function requireProjectRole(request: Request, projectId: string | undefined, needed: Role) {
    return projectAccess(await requireUser(request), projectId, needed);
  }

  async function requireEffectRole(request: Request, effectId: string | undefined, needed: Role) {
    return effectAccess(await requireUser(request), effectId, needed);
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
