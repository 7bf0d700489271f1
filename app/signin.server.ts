import { createCookie } from "react-router";
import { env } from "./env.server.ts";

let nextCookie: ReturnType<typeof createCookie> | undefined;

/** A short-lived cookie that remembers where to go after signing in (it cannot ride in the OAuth state). */
export function returnToCookie() {
  nextCookie ??= createCookie("skewsmith_next", {
    httpOnly: true,
    sameSite: "lax",
    secure: env().secureCookies,
    path: "/",
    maxAge: 10 * 60,
  });
  return nextCookie;
}

/** The longest return address kept: enough for any page of the app with its query, small for a cookie. */
export const NEXT_MAX = 512;

/** Any C0 or C1 control character, DEL, or a space: the URL parser drops or re-reads these, so none may appear. */
const UNSAFE_CHARACTER = /[\u0000-\u0020\u007f-\u009f\\]/;
/** Where a return address must never lead: back into signing in or out. */
const LOOPS = /^\/(sign-in|sign-out|auth)(\/|\?|#|\.|$)/i;
/** Any origin stands in for this app's own when checking that a path stays on it. */
const HOME = "https://skewsmith.invalid";

/** Decodes percent escapes until nothing changes (at most 4 rounds), or null when an escape is broken. */
function fullyDecoded(value: string): string | null {
  let current = value;
  for (let i = 0; i < 4; i++) {
    let next: string;
    try {
      next = decodeURIComponent(current);
    } catch {
      return null;
    }
    if (next === current) return current;
    current = next;
  }
  return current;
}

/**
 * Where to go after signing in: a path on this app's own origin, or "/" for anything else (no open redirects).
 * Accepted: a string of at most NEXT_MAX printable ASCII characters that starts with a single "/", holds no
 * backslash, space or control character and no percent escape that decodes to one (or to a leading "//"), does not
 * lead back into signing in, and resolves, by the WHATWG URL parser, to a path on the same origin. What comes back
 * is the parser's own serialisation, the exact path a browser will follow.
 */
export function safeNext(value: unknown): string {
  if (typeof value !== "string" || value.length === 0 || value.length > NEXT_MAX) return "/";
  if (!value.startsWith("/") || value.startsWith("//") || UNSAFE_CHARACTER.test(value)) return "/";
  const decoded = fullyDecoded(value);
  if (decoded === null || UNSAFE_CHARACTER.test(decoded) || /^[/\\]{2}/.test(decoded) || !/^[\x21-\x7e]*$/.test(value)) return "/";
  if (LOOPS.test(decoded)) return "/";
  let url: URL;
  try {
    url = new URL(value, HOME);
  } catch {
    return "/";
  }
  if (url.origin !== HOME) return "/";
  const path = `${url.pathname}${url.search}${url.hash}`;
  if (!path.startsWith("/") || path.startsWith("//") || path.length > NEXT_MAX || LOOPS.test(path)) return "/";
  return path;
}

/** Why a sign-in failed, in words a person can act on, by the code in `/sign-in?error=`. */
export const SIGN_IN_ERRORS: ReadonlyMap<string, string> = new Map([
  ["denied", "Signing in was cancelled at GitHub. Nothing changed; start again when you are ready."],
  [
    "state",
    "This sign-in could not be verified: its state check failed (it may have been started in another tab, or taken longer than five minutes). Start again.",
  ],
  ["provider", "GitHub did not confirm the sign-in (the one-time code was refused, or your profile could not be read). Start again."],
]);

/** The message for an error code from the query string; any other value (say "constructor") gets the general one. */
export function signInErrorMessage(code: string): string {
  return SIGN_IN_ERRORS.get(code) ?? SIGN_IN_ERRORS.get("provider")!;
}
