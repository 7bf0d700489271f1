import { endpoint } from "../../api/endpoint.server.ts";
import { deleteToken, getToken } from "../../api/v1.server.ts";

/** GET /api/v1/tokens/:tokenId: one of the caller's tokens; DELETE revokes it (signed-in session only). */
const api = endpoint({ GET: getToken, DELETE: deleteToken });
export const loader = api.loader;
export const action = api.action;
