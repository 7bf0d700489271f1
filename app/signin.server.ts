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

/** A path inside this app to return to, or "/" for anything else (no open redirects). */
export function safeNext(value: unknown): string {
  if (typeof value !== "string" || !value.startsWith("/") || value.startsWith("//") || value.startsWith("/\\")) return "/";
  if (value.startsWith("/sign-in") || value.startsWith("/auth/") || value.startsWith("/sign-out")) return "/";
  return value;
}

/** Why a sign-in failed, in words a person can act on. */
export const SIGN_IN_ERRORS: Record<string, string> = {
  denied: "Signing in was cancelled at GitHub. Nothing changed; start again when you are ready.",
  state:
    "This sign-in could not be verified: its state check failed (it may have been started in another tab, or taken longer than five minutes). Start again.",
  provider: "GitHub did not confirm the sign-in (the one-time code was refused, or your profile could not be read). Start again.",
};
