import { endpoint } from "../../api/endpoint.server.ts";
import { getProjectExport } from "../../api/v1.server.ts";

/** GET /api/v1/projects/:projectId/export.zip: the project's export bundle (ETag, 304). */
const api = endpoint({ GET: getProjectExport });
export const loader = api.loader;
export const action = api.action;
