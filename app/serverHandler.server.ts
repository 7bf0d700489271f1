/**
 * The app as one function from a Request to a Response, around the framework's handler: what every request goes
 * through, whichever route (page, resource route, API) answers it.
 *
 *   1. a state-changing request must come from this app's own origin (security.server.ts checkOrigin), else 403;
 *   2. the framework handles it, with every route's loader and action behind the catch-all (routeErrors.server.ts);
 *   3. the answer gets the security headers, `Cache-Control: private, no-store` unless the route chose its own,
 *      and `X-Request-Id`; pages and data responses are sent whole (one write, with a Content-Length).
 *
 * server/app.ts puts it behind Node's HTTP server; tests can call it directly.
 */
import { createRequestHandler, type ServerBuild } from "react-router";
import { env } from "./env.server.ts";
import { logError } from "./log.server.ts";
import { currentRequestId } from "./requestContext.server.ts";
import { hardenBuild, RETRY_AFTER_SECONDS } from "./routeErrors.server.ts";
import { checkOrigin, commonSecurityHeaders, RESOURCE_CSP } from "./security.server.ts";

export type BuildSource = ServerBuild | (() => ServerBuild | Promise<ServerBuild>);

/** Content types sent whole rather than streamed: pages and the framework's data responses (both small). */
const SEND_WHOLE = /^(text\/html|text\/x-script)\b/i;

function escapeHtml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);
}

const wholeBodies = new WeakMap<Response, Uint8Array<ArrayBuffer>>();

/**
 * A response whose body is already in memory (a rendered page): the server sends these bytes in one call instead
 * of reading them back through the Response's stream (wholeBodyOf). The Response is an ordinary one otherwise.
 */
export function wholeResponse(body: Uint8Array<ArrayBuffer>, init: ResponseInit): Response {
  const response = new Response(body, init);
  wholeBodies.set(response, body);
  return response;
}

/** The bytes of a response made by wholeResponse whose body nobody has read yet; undefined for any other. */
export function wholeBodyOf(response: Response): Uint8Array<ArrayBuffer> | undefined {
  return response.bodyUsed ? undefined : wholeBodies.get(response);
}

/** A refusal made before any route ran: JSON for data and API requests, a small page for a browser. */
export function refusal(request: Request, status: number, message: string): Response {
  const requestId = currentRequestId();
  const url = new URL(request.url);
  const wantsJson =
    url.pathname.endsWith(".data") || url.pathname.startsWith("/api/") || /application\/json/i.test(request.headers.get("Accept") ?? "");
  if (wantsJson)
    return new Response(JSON.stringify({ error: { status, message, field: null, requestId } }), {
      status,
      headers: { "Content-Type": "application/json; charset=utf-8" },
    });
  const page = `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Refused · Skewsmith</title></head><body>
<main><p>${status}</p><h1>This request was refused</h1><p>${escapeHtml(message)}</p>
<p>Nothing was changed. Go back to Skewsmith and use its own pages.</p>${requestId ? `<p>Reference: <code>${escapeHtml(requestId)}</code></p>` : ""}
<p><a href="/">Back to your teams</a></p></main></body></html>`;
  return new Response(page, { status, headers: { "Content-Type": "text/html; charset=utf-8" } });
}

/** The final headers of an answer: security headers, caching and the request id. */
export async function finishResponse(response: Response, options: { https: boolean }): Promise<Response> {
  // The framework's responses have headers that may change; a Response from elsewhere may not (then it is copied).
  let headers = response.headers;
  try {
    headers.set("X-Request-Id", currentRequestId() ?? "");
  } catch {
    headers = new Headers(response.headers);
  }
  const requestId = currentRequestId();
  if (requestId) headers.set("X-Request-Id", requestId);
  else headers.delete("X-Request-Id");
  for (const [name, value] of commonSecurityHeaders(options)) if (!headers.has(name)) headers.set(name, value);
  // Pages set their own policy (with the nonce of their scripts) in entry.server.tsx; everything else may load nothing.
  if (!headers.has("Content-Security-Policy")) headers.set("Content-Security-Policy", RESOURCE_CSP);
  // Whatever the app answers may be someone's private data; a route that may be cached says so itself.
  if (!headers.has("Cache-Control")) headers.set("Cache-Control", "private, no-store");
  // A page rendered for a 503 loses the Retry-After its loader's error carried; every 503 says when to come back.
  if (response.status === 503 && !headers.has("Retry-After")) headers.set("Retry-After", String(RETRY_AFTER_SECONDS));
  // Data responses come as many small chunks; read them whole to send one write (pages already are whole).
  const whole = response.body && !headers.has("Content-Length") && SEND_WHOLE.test(headers.get("Content-Type") ?? "");
  if (!whole && headers === response.headers) return response;
  let body: BodyInit | null = response.body;
  if (whole) {
    const bytes = new Uint8Array(await response.arrayBuffer());
    headers.set("Content-Length", String(bytes.byteLength));
    body = bytes;
  }
  return new Response(body, { status: response.status, statusText: response.statusText, headers });
}

/** The app's fetch handler over a server build (the built one, or Vite's in development). */
export function createFetchHandler(options: { build: BuildSource; mode: "production" | "development" }) {
  const source = options.build;
  const handler = createRequestHandler(
    typeof source === "function" ? async () => hardenBuild(await source()) : hardenBuild(source),
    options.mode,
  );
  return async function handle(request: Request): Promise<Response> {
    const config = env();
    const https = config.appOrigin.startsWith("https:");
    const verdict = checkOrigin(request, config.appOrigin);
    if (!verdict.ok) return finishResponse(refusal(request, 403, verdict.reason), { https });
    let response: Response;
    try {
      response = await handler(request);
    } catch (error) {
      // The framework answers every route error itself; reaching here means its own machinery failed.
      logError("the request handler failed", error);
      response = refusal(request, 500, "Something went wrong on our side. It was logged; try again in a moment.");
    }
    return finishResponse(response, { https });
  };
}
