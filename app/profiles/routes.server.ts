import { data } from "react-router";
import { db } from "../db.server.ts";
import type { Role } from "../db/schema.ts";
import { requireTeamRole } from "../guards.server.ts";
import { getTeamProfile } from "../models/targetProfiles.server.ts";

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/**
 * The guard of the profile pages: a member of the team with at least `needed` (404 for outsiders, 403 for a low
 * role, as requireTeamRole answers) and a profile of that team (404 otherwise, the same answer as for no such id).
 */
export async function requireTeamProfile(request: Request, teamId: string | undefined, profileId: string | undefined, needed: Role) {
  const guarded = await requireTeamRole(request, teamId, needed);
  const profile = profileId && UUID.test(profileId) ? await getTeamProfile(db(), guarded.team.id, profileId) : null;
  if (!profile) throw data({ message: "This target profile does not exist, or it belongs to a team you are not in." }, { status: 404 });
  return { ...guarded, profile };
}
