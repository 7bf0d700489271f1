import { endpoint } from "../../api/endpoint.server.ts";
import { getTeamProjects } from "../../api/v1.server.ts";

/** GET /api/v1/teams/:teamId/projects: the team's live (or, with ?archived=true, archived) projects. */
const api = endpoint({ GET: getTeamProjects });
export const loader = api.loader;
export const action = api.action;
