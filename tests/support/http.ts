/**
 * Plain HTTP against a running server, as a browser would talk to it: a cookie jar per person, the Origin a page of
 * the app sends, and sign-in through the GitHub stand-in (the real OAuth round trip, not a forged cookie).
 */
import type { User } from "../../app/db/schema.ts";

/** A tiny cookie jar: name → value, updated from every Set-Cookie. */
export class Jar {
  readonly cookies = new Map<string, string>();
  take(response: Response): void {
    for (const line of response.headers.getSetCookie()) {
      const [pair, ...attributes] = line.split(";");
      const at = pair.indexOf("=");
      const name = pair.slice(0, at).trim();
      const value = pair.slice(at + 1).trim();
      const expired = attributes.some((a) => /^\s*max-age=0\s*$/i.test(a) || /^\s*expires=thu, 01 jan 1970/i.test(a));
      if (expired || value === "") this.cookies.delete(name);
      else this.cookies.set(name, value);
    }
  }
  header(): string {
    return [...this.cookies].map(([k, v]) => `${k}=${v}`).join("; ");
  }
}

export interface Client {
  readonly base: string;
  readonly jar: Jar;
  /** A request with this person's cookies (and, for anything but GET/HEAD, this app's Origin unless told otherwise). */
  fetch(path: string, init?: RequestInit & { origin?: string | null }): Promise<Response>;
  /** POSTs a urlencoded form. */
  post(path: string, form: Record<string, string> | [string, string][], init?: RequestInit & { origin?: string | null }): Promise<Response>;
}

export function client(base: string, jar = new Jar()): Client {
  const origin = new URL(base).origin;
  async function send(path: string, init: RequestInit & { origin?: string | null } = {}): Promise<Response> {
    const headers = new Headers(init.headers);
    if (jar.cookies.size > 0 && !headers.has("Cookie")) headers.set("Cookie", jar.header());
    const method = (init.method ?? "GET").toUpperCase();
    const sendOrigin = init.origin === undefined ? origin : init.origin;
    if (method !== "GET" && method !== "HEAD" && sendOrigin !== null && !headers.has("Origin")) headers.set("Origin", sendOrigin);
    const response = await fetch(new URL(path, base), { ...init, headers, redirect: "manual" });
    jar.take(response);
    return response;
  }
  return {
    base,
    jar,
    fetch: send,
    post: (path, form, init = {}) =>
      send(path, {
        ...init,
        method: "POST",
        headers: { "Content-Type": "application/x-www-form-urlencoded", ...Object.fromEntries(new Headers(init.headers)) },
        body: new URLSearchParams(form).toString(),
      }),
  };
}

/** Tells the stand-in about a person the test made, so its chooser offers them. */
export async function offerAccount(githubUrl: string, user: Pick<User, "githubId" | "login" | "name" | "email">): Promise<void> {
  const added = await fetch(`${githubUrl}/_accounts`, {
    method: "POST",
    headers: { "Content-Type": "application/json" },
    body: JSON.stringify({ githubId: user.githubId, login: user.login, name: user.name, email: user.email }),
  });
  if (added.status !== 201) throw new Error(`the GitHub stand-in refused ${user.login}: ${await added.text()}`);
}

/**
 * Signs in over HTTP the way a browser does: the sign-in form's POST, the stand-in's chooser, the callback.
 * Returns the final redirect (where the app sends the person) with the client's jar now holding the session.
 */
export async function signInOverHttp(c: Client, githubUrl: string, login: string, next?: string): Promise<Response> {
  const start = await c.post("/auth/github", next === undefined ? {} : { next });
  if (start.status !== 302) throw new Error(`sign-in start answered ${start.status}: ${await start.text()}`);
  const chooser = new URL(start.headers.get("Location")!);
  const choice = await fetch(`${githubUrl}/login/oauth/authorize`, {
    method: "POST",
    body: new URLSearchParams({
      client_id: chooser.searchParams.get("client_id")!,
      redirect_uri: chooser.searchParams.get("redirect_uri")!,
      state: chooser.searchParams.get("state")!,
      login,
    }),
    redirect: "manual",
  });
  if (choice.status !== 302) throw new Error(`the stand-in answered ${choice.status}: ${await choice.text()}`);
  const callback = new URL(choice.headers.get("Location")!);
  return c.fetch(`${callback.pathname}${callback.search}`);
}

/** A new client signed in as `user` (a person the test made), through the stand-in. */
export async function signedIn(
  base: string,
  githubUrl: string,
  user: Pick<User, "githubId" | "login" | "name" | "email">,
): Promise<Client> {
  await offerAccount(githubUrl, user);
  const c = client(base);
  const done = await signInOverHttp(c, githubUrl, user.login);
  if (done.status !== 302 || done.headers.get("Location") !== "/")
    throw new Error(`sign-in ended with ${done.status} ${done.headers.get("Location")}`);
  return c;
}

/** The message of an error page (the root boundary's `error-message` paragraph), decoded. */
export function errorMessageOf(html: string): string | null {
  const match = /data-testid="error-message"[^>]*>([\s\S]*?)<\/p>/.exec(html);
  return match ? decodeEntities(match[1]) : null;
}

export function decodeEntities(s: string): string {
  return s
    .replace(/<!-- -->/g, "")
    .replace(/&quot;/g, '"')
    .replace(/&#x27;|&#39;/g, "'")
    .replace(/&lt;/g, "<")
    .replace(/&gt;/g, ">")
    .replace(/&amp;/g, "&");
}
