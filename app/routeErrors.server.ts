/**
 * The catch-all between the framework and every route's loader and action: whatever a route throws becomes a clean
 * answer with a status that says what happened, never a bare 500 with no explanation.
 *
 *   thrown Response (redirects)           passed through
 *   thrown data({ message }, status)      passed through, with the request id added; a resource route answers JSON
 *   DomainError                           its status (400, 404, 409) and message, next to its field
 *   PostgreSQL unique violation           409: someone saved a clashing name at the same moment
 *   database unreachable                  503 with Retry-After: nothing was saved, try again shortly
 *   anything else                         500, logged with its stack under the request id the person is shown
 *
 * The server applies it to the whole build (`hardenBuild`), so routes added later are covered without doing
 * anything. Pages show the answer in the root error boundary; resource routes (files, the API) answer JSON:
 * `{ "error": { "status", "message", "field", "requestId" } }` (field null unless one field is to blame), the
 * shape of the JSON API's errors.
 */
import { data, type UNSAFE_DataWithResponseInit as DataWithResponseInit, type ServerBuild } from "react-router";
import { logError } from "./log.server.ts";
import { DomainError, isDatabaseUnavailable, isUniqueViolation } from "./models/errors.ts";
import { currentRequestId } from "./requestContext.server.ts";

/** What an error answer carries (pages read it in the error boundary, JSON clients in `error`). */
export interface ErrorPayload {
  message: string;
  requestId?: string;
  field?: string;
  [key: string]: unknown;
}

export const UNEXPECTED_MESSAGE = "Something went wrong on our side. It was logged; try again in a moment.";
export const UNAVAILABLE_MESSAGE = "The database is not reachable right now, so nothing was read or saved. Try again in a few seconds.";
export const CLASH_MESSAGE =
  "Someone else saved a clashing change at the same moment (say, the same name). Nothing of yours was saved; reload and try again.";

/** Seconds a client should wait before trying again while the database is unreachable. */
export const RETRY_AFTER_SECONDS = 5;

function isResponse(value: unknown): value is Response {
  return value instanceof Response;
}

/** A thrown `data(…)` (the framework recognises it by this shape too; its class is not exported at run time). */
function isData(value: unknown): value is DataWithResponseInit<unknown> {
  return typeof value === "object" && value !== null && (value as { type?: unknown }).type === "DataWithResponseInit" && "data" in value;
}

/** The answer for an error a route threw: a Response to pass on, or a `data()` error for the boundary. */
export function translateError(
  thrown: unknown,
  options: { request?: Request; where?: string } = {},
): Response | DataWithResponseInit<ErrorPayload> {
  const requestId = currentRequestId();
  if (isResponse(thrown)) return thrown;
  if (isData(thrown)) {
    const body = thrown.data;
    if (body && typeof body === "object" && !Array.isArray(body)) {
      const payload = body as ErrorPayload;
      if (payload.requestId === undefined && requestId !== undefined) payload.requestId = requestId;
    }
    return thrown as DataWithResponseInit<ErrorPayload>;
  }
  if (thrown instanceof DomainError)
    return data<ErrorPayload>({ message: thrown.message, field: thrown.field, requestId }, { status: thrown.status });
  if (isUniqueViolation(thrown)) return data<ErrorPayload>({ message: CLASH_MESSAGE, requestId }, { status: 409 });
  if (isDatabaseUnavailable(thrown)) {
    logError("database unreachable", thrown, { where: options.where });
    return data<ErrorPayload>(
      { message: UNAVAILABLE_MESSAGE, requestId },
      { status: 503, headers: { "Retry-After": String(RETRY_AFTER_SECONDS) } },
    );
  }
  if (options.request?.signal.aborted) return data<ErrorPayload>({ message: "The request was cancelled.", requestId }, { status: 499 });
  logError("unhandled error", thrown, { where: options.where });
  return data<ErrorPayload>({ message: UNEXPECTED_MESSAGE, requestId }, { status: 500 });
}

/** A `data()` error as the JSON response a resource route answers. */
export function errorJson(error: DataWithResponseInit<unknown>): Response {
  const status = error.init?.status ?? 500;
  const headers = new Headers(error.init?.headers);
  headers.set("Content-Type", "application/json; charset=utf-8");
  const body =
    error.data && typeof error.data === "object" ? (error.data as Record<string, unknown>) : { message: String(error.data ?? "") };
  return new Response(JSON.stringify({ error: { status, field: null, ...body } }), { status, headers });
}

type RouteHandler = (args: { request: Request; params: unknown; context: unknown }) => unknown;

function harden(handler: RouteHandler | undefined, where: string, resource: boolean): RouteHandler | undefined {
  if (typeof handler !== "function") return handler;
  return async function hardened(args) {
    try {
      return await handler(args);
    } catch (thrown) {
      const answer = translateError(thrown, { request: args.request, where });
      if (isResponse(answer)) throw answer;
      // The framework turns a resource route's thrown data() into a bare "Unexpected Server Error"; answer JSON.
      throw resource ? errorJson(answer) : answer;
    }
  };
}

/** The build with every route's loader and action behind `translateError`. */
export function hardenBuild(build: ServerBuild): ServerBuild {
  const routes: ServerBuild["routes"] = {};
  for (const [id, route] of Object.entries(build.routes)) {
    if (!route) continue;
    const module = route.module as unknown as Record<string, unknown>;
    // The framework's own rule for a resource route: no component and no error boundary.
    const resource = module.default == null && module.ErrorBoundary == null;
    const hardenedModule: Record<string, unknown> = { ...module };
    if (module.loader) hardenedModule.loader = harden(module.loader as RouteHandler, `${id} loader`, resource);
    if (module.action) hardenedModule.action = harden(module.action as RouteHandler, `${id} action`, resource);
    routes[id] = { ...route, module: hardenedModule as unknown as typeof route.module };
  }
  return { ...build, routes };
}
