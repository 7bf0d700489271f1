import { endpoint } from "../../api/endpoint.server.ts";
import { postTables } from "../../api/v1.server.ts";

/** POST /api/v1/tables: the tables document of the effect document in the body, as `skewsmith tables` prints it. */
const api = endpoint({ POST: postTables });
export const loader = api.loader;
export const action = api.action;
