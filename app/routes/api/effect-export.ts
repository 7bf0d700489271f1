import { endpoint } from "../../api/endpoint.server.ts";
import { getEffectExport } from "../../api/v1.server.ts";

/** GET /api/v1/effects/:effectId/export.zip: the effect's export bundle (ETag, 304). */
const api = endpoint({ GET: getEffectExport });
export const loader = api.loader;
export const action = api.action;
