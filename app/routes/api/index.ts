import { endpoint } from "../../api/endpoint.server.ts";
import { getIndex } from "../../api/v1.server.ts";

/** GET /api/v1: who the credentials belong to, and through what (session or token, and its scope). */
const api = endpoint({ GET: getIndex });
export const loader = api.loader;
export const action = api.action;
