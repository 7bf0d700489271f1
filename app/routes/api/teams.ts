import { endpoint } from "../../api/endpoint.server.ts";
import { getTeams } from "../../api/v1.server.ts";

/** GET /api/v1/teams: the caller's teams with their role in each. */
const api = endpoint({ GET: getTeams });
export const loader = api.loader;
export const action = api.action;
