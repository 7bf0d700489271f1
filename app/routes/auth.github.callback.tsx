import { redirect } from "react-router";
import { OAuth2RequestError } from "remix-auth-github";
import type { Route } from "./+types/auth.github.callback";
import { auth, OAUTH_STATE_COOKIE } from "../auth.server.ts";
import { env } from "../env.server.ts";
import { log } from "../log.server.ts";
import { limitSignIn } from "../rateLimit.server.ts";
import { sessionStorage } from "../sessions.server.ts";
import { returnToCookie, safeNext } from "../signin.server.ts";

function clearStateCookie(): string {
  return `${OAUTH_STATE_COOKIE}=; Path=/; Max-Age=0; HttpOnly; SameSite=Lax${env().secureCookies ? "; Secure" : ""}`;
}

/** GitHub (or the stand-in) sends the browser back here; the strategy checks the state, trades the code, and we open a session. */
export async function loader({ request }: Route.LoaderArgs) {
  await limitSignIn(request);
  let user;
  try {
    user = await auth().authenticate("github", request);
  } catch (error) {
    if (error instanceof Response) throw error;
    const reason =
      error instanceof OAuth2RequestError && error.code === "access_denied"
        ? "denied"
        : error instanceof RangeError || error instanceof ReferenceError
          ? "state"
          : "provider";
    log("warn", "sign-in failed", { reason, detail: (error as Error).message });
    throw redirect(`/sign-in?error=${reason}`, { headers: { "Set-Cookie": clearStateCookie() } });
  }

  const storage = sessionStorage();
  // A fresh session id for every sign-in; any earlier session of this browser ends on the server.
  const old = await storage.getSession(request.headers.get("Cookie"));
  if (old.id) await storage.destroySession(old);
  const session = await storage.getSession();
  session.set("userId", user.id);
  const headers = new Headers();
  headers.append("Set-Cookie", await storage.commitSession(session));
  headers.append("Set-Cookie", clearStateCookie());
  const next = safeNext(await returnToCookie().parse(request.headers.get("Cookie")));
  headers.append("Set-Cookie", await returnToCookie().serialize("", { maxAge: 0 }));
  return redirect(next, { headers });
}
