import { endpoint } from "../../api/endpoint.server.ts";
import { getEffect, putEffect } from "../../api/v1.server.ts";

/** GET /api/v1/effects/:effectId: the effect and its document; PUT saves a new document from a version. */
const api = endpoint({ GET: getEffect, PUT: putEffect });
export const loader = api.loader;
export const action = api.action;
