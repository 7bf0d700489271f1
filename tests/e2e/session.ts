/**
 * A signed-in session for HTTP tests without a browser: the same sign-in a person goes through (the app's start
 * action, the GitHub stand-in's account chooser, the app's callback), done with fetch. Returns the Cookie header.
 */
import { inject } from "vitest";
import type { User } from "../../app/db/schema.ts";
import { appUrl } from "./support.ts";

/** Cookies a response set, as name=value pairs (attributes dropped). */
function setCookies(response: Response, jar: Map<string, string>): void {
  for (const line of response.headers.getSetCookie()) {
    const [pair] = line.split(";");
    const eq = pair.indexOf("=");
    const name = pair.slice(0, eq).trim();
    const value = pair.slice(eq + 1).trim();
    if (value === "" || /max-age=0/i.test(line)) jar.delete(name);
    else jar.set(name, value);
  }
}

const header = (jar: Map<string, string>) => [...jar].map(([k, v]) => `${k}=${v}`).join("; ");

/** Signs `user` in through the real OAuth round trip and returns the Cookie header of the new session. */
export async function sessionCookie(user: Pick<User, "githubId" | "login" | "name" | "email">): Promise<string> {
  const github = inject("githubUrl");
  const added = await fetch(`${github}/_accounts`, {
    method: "POST",
    headers: { "Content-Type": "application/json" },
    body: JSON.stringify({ githubId: user.githubId, login: user.login, name: user.name, email: user.email }),
  });
  if (added.status !== 201) throw new Error(`the GitHub stand-in refused ${user.login}: ${await added.text()}`);

  const jar = new Map<string, string>();
  const start = await fetch(`${appUrl()}/auth/github`, {
    method: "POST",
    redirect: "manual",
    headers: { "Content-Type": "application/x-www-form-urlencoded", Origin: appUrl() },
    body: "next=%2F",
  });
  if (start.status !== 302) throw new Error(`starting the sign-in answered ${start.status}: ${await start.text()}`);
  setCookies(start, jar);
  const authorize = new URL(start.headers.get("Location")!);

  const chosen = await fetch(`${github}/login/oauth/authorize`, {
    method: "POST",
    redirect: "manual",
    headers: { "Content-Type": "application/x-www-form-urlencoded" },
    body: new URLSearchParams({
      client_id: authorize.searchParams.get("client_id") ?? "",
      redirect_uri: authorize.searchParams.get("redirect_uri") ?? "",
      state: authorize.searchParams.get("state") ?? "",
      login: user.login,
    }),
  });
  if (chosen.status !== 302) throw new Error(`the stand-in's chooser answered ${chosen.status}: ${await chosen.text()}`);

  const callback = await fetch(chosen.headers.get("Location")!, { redirect: "manual", headers: { Cookie: header(jar) } });
  if (callback.status !== 302) throw new Error(`the sign-in callback answered ${callback.status}: ${await callback.text()}`);
  setCookies(callback, jar);
  const cookie = header(jar);
  const check = await fetch(`${appUrl()}/`, { headers: { Cookie: cookie }, redirect: "manual" });
  if (check.status !== 200) throw new Error(`the new session did not open the home page (${check.status})`);
  return cookie;
}
