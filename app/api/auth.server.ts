/**
 * Who is calling the API: a person signed in with the session cookie, or a build holding one of their tokens
 * (`Authorization: Bearer sks_…`). A token acts as its person, within its scope; the person's roles apply as in the app.
 */
import type { User } from "../db/schema.ts";
import { db } from "../db.server.ts";
import { env } from "../env.server.ts";
import { getUserFromRequest } from "../guards.server.ts";
import { findApiToken, touchApiToken } from "../models/apiTokens.server.ts";
import { limitApiToken } from "../rateLimit.server.ts";
import { currentRequest } from "../requestContext.server.ts";
import { scopeAllows, type TokenScope } from "../tokens.ts";
import { ApiError } from "./responses.server.ts";

export interface ApiCaller {
  readonly user: User;
  /** How the caller proved who they are. */
  readonly via: "session" | "token";
  /** What the caller may do: a session may do what the person's roles allow; a token no more than its scope. */
  readonly scope: TokenScope;
  readonly tokenId: string | null;
}

/** Tells an HTTP client which credentials to send (RFC 6750 §3). */
const CHALLENGE = { "WWW-Authenticate": 'Bearer realm="skewsmith"' };

const SAFE_METHODS = new Set(["GET", "HEAD", "OPTIONS"]);

function unauthorized(message: string): never {
  throw new ApiError(401, message, { headers: CHALLENGE });
}

/** The origins this app answers as: its configured address, and the address the request itself came to. */
function ownOrigins(request: Request): Set<string> {
  const origins = new Set([new URL(request.url).origin]);
  try {
    origins.add(new URL(env().APP_URL).origin);
  } catch {
    // Without a valid APP_URL the app does not start; the request's own origin still stands.
  }
  return origins;
}

/**
 * A call that changes something must come from this app's own pages when it rides on the session cookie (a page on
 * another site could otherwise make the browser send it). With a token, which no browser sends by itself, the Origin
 * may be absent; if a browser does send one, it must still be ours.
 */
export function checkOrigin(request: Request, via: ApiCaller["via"]): void {
  if (SAFE_METHODS.has(request.method)) return;
  const origin = request.headers.get("Origin");
  if (origin === null) {
    if (via === "token") return;
    throw new ApiError(
      403,
      "This call changes something and rides on the session cookie, so it must come from Skewsmith's own pages (no Origin header was sent). Scripts use an API token instead.",
    );
  }
  if (!ownOrigins(request).has(origin))
    throw new ApiError(
      403,
      `Calls that change something are accepted only from Skewsmith's own pages, not from ${JSON.stringify(origin.slice(0, 100))}.`,
    );
}

const REFUSED: Record<"unknown" | "revoked" | "expired", string> = {
  unknown: "This API token is not valid: check that it was copied whole. Create a new one on your settings page if it is lost.",
  revoked: "This API token was revoked. Create a new one on your settings page.",
  expired: "This API token has expired. Create a new one on your settings page.",
};

/** The caller of an API request; 401 without valid credentials. A token's use is recorded (at most once a minute). */
export async function authenticate(request: Request): Promise<ApiCaller> {
  const authorization = request.headers.get("Authorization");
  let caller: ApiCaller;
  if (authorization !== null) {
    const bearer = /^Bearer +([^\s]+) *$/i.exec(authorization);
    if (!bearer) unauthorized("The Authorization header must be “Bearer <token>”, with a token from your settings page.");
    const found = await findApiToken(db(), bearer[1]);
    if (!found.ok) unauthorized(REFUSED[found.reason]);
    await limitApiToken(found.token.id);
    const info = currentRequest();
    if (info) info.userId = found.user.id;
    await touchApiToken(db(), found.token);
    caller = { user: found.user, via: "token", scope: found.token.scope, tokenId: found.token.id };
  } else {
    const user = await getUserFromRequest(request);
    if (!user) unauthorized("Sign in, or send an API token as “Authorization: Bearer <token>”.");
    caller = { user, via: "session", scope: "write", tokenId: null };
  }
  checkOrigin(request, caller.via);
  return caller;
}

/** 403 unless the caller's token may do what `needed` asks (a session may do anything the person's role allows). */
export function requireScope(caller: ApiCaller, needed: TokenScope): void {
  if (!scopeAllows(caller.scope, needed))
    throw new ApiError(403, "This token may only read. Create a token with the write scope to change things.", { field: null });
}
