import { endpoint } from "../../api/endpoint.server.ts";
import { getTokens, postToken } from "../../api/v1.server.ts";

/** GET /api/v1/tokens lists the caller's tokens; POST makes one (signed-in session only). */
const api = endpoint({ GET: getTokens, POST: postToken });
export const loader = api.loader;
export const action = api.action;
