import { endpoint } from "../../api/endpoint.server.ts";
import { getProjectEffects } from "../../api/v1.server.ts";

/** GET /api/v1/projects/:projectId/effects: the project's live effects. */
const api = endpoint({ GET: getProjectEffects });
export const loader = api.loader;
export const action = api.action;
