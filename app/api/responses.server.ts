/**
 * JSON answers of the API (and of the export downloads): data as JSON, and every error as
 * `{"error": {"message", "field"}}` with its status, never an HTML page.
 */
import { DomainError } from "../models/errors.ts";
import { currentRequestId } from "../requestContext.server.ts";
import { translateError } from "../routeErrors.server.ts";

/** Headers every API answer carries: JSON, and nothing kept by shared caches. */
const JSON_HEADERS = { "Content-Type": "application/json; charset=utf-8", "Cache-Control": "private, no-store" } as const;

/** A JSON answer with `status`. */
export function json(body: unknown, status = 200, headers: HeadersInit = {}): Response {
  const h = new Headers(headers);
  for (const [k, v] of Object.entries(JSON_HEADERS)) if (!h.has(k)) h.set(k, v);
  return new Response(`${JSON.stringify(body)}\n`, { status, headers: h });
}

/**
 * An error answer: `{"error": {"message", "field", "requestId"}}`, with `field` null unless one field is to blame and
 * `requestId` the id the server's log has this request under (for a report).
 */
export function apiError(status: number, message: string, field: string | null = null, headers: HeadersInit = {}): Response {
  return json({ error: { message, field, requestId: currentRequestId() ?? null } }, status, headers);
}

/** Thrown inside an API handler to answer with an error at once. */
export class ApiError extends Error {
  readonly status: number;
  readonly field: string | null;
  readonly headers: HeadersInit;
  constructor(status: number, message: string, options: { field?: string | null; headers?: HeadersInit } = {}) {
    super(message);
    this.name = "ApiError";
    this.status = status;
    this.field = options.field ?? null;
    this.headers = options.headers ?? {};
  }
}

/** What `data({ message }, { status })` throws (the guards and the body readers): recognised by shape. */
function thrownData(error: unknown): { status: number; message: string } | null {
  const e = error as { type?: unknown; data?: { message?: unknown }; init?: { status?: unknown } | null };
  if (e === null || typeof e !== "object" || e.type !== "DataWithResponseInit") return null;
  const status = typeof e.init?.status === "number" ? e.init.status : 500;
  const message = typeof e.data?.message === "string" ? e.data.message : "The request could not be handled.";
  return { status, message };
}

/**
 * Turns anything a handler threw into an error answer; unexpected errors are logged and become a plain 500. A guard's
 * redirect to sign-in becomes a 401, unless `redirects` lets it through (downloads a person opens in the browser).
 */
export function errorResponse(error: unknown, options: { redirects?: boolean } = {}): Response {
  if (error instanceof ApiError) return apiError(error.status, error.message, error.field, error.headers);
  if (error instanceof DomainError) return apiError(error.status, error.message, error.field ?? null);
  const thrown = thrownData(error);
  if (thrown) return apiError(thrown.status, thrown.message);
  if (error instanceof Response) {
    // A guard's redirect to sign-in: an API caller is told instead of being sent to a page.
    if (error.status >= 300 && error.status < 400 && !options.redirects)
      return apiError(401, "Sign in, or send an API token as “Authorization: Bearer <token>”.");
    return error;
  }
  // Everything else as the app answers it: a unique violation is a 409, a database that is down a 503, anything
  // else a 500 logged with its stack under the request id the answer carries (routeErrors.server.ts).
  const answer = translateError(error, { where: "api" });
  if (answer instanceof Response) return answer;
  return apiError(answer.init?.status ?? 500, answer.data.message, answer.data.field ?? null, answer.init?.headers ?? {});
}

/** Runs a handler, answering whatever it throws as a JSON error. */
export async function answering(work: () => Promise<Response>, options: { redirects?: boolean } = {}): Promise<Response> {
  try {
    return await work();
  } catch (error) {
    return errorResponse(error, options);
  }
}
