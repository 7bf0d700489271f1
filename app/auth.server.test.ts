import { OAuth2RequestError } from "remix-auth-github";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startFakeGitHub, type FakeGitHub } from "../scripts/fakes/oauth.ts";
import { testDatabaseUrl, testDb } from "../tests/support/db.ts";
import { createAuthenticator, OAUTH_STATE_COOKIE } from "./auth.server.ts";
import { demoPerson } from "./demo/people.ts";
import { readEnv } from "./env.server.ts";
import { getUser } from "./models/users.server.ts";

const db = testDb();
const APP_URL = "http://127.0.0.1:3999";
let fake: FakeGitHub;

beforeAll(async () => {
  fake = await startFakeGitHub({ clientId: "test-client", clientSecret: "test-secret" });
});
afterAll(async () => {
  await fake.close();
  await db.$client.end();
});

function config(overrides: Record<string, string | undefined> = {}) {
  return readEnv({
    NODE_ENV: "test",
    DATABASE_URL: testDatabaseUrl(),
    APP_URL,
    SESSION_SECRET: "s".repeat(40),
    GITHUB_CLIENT_ID: "test-client",
    GITHUB_CLIENT_SECRET: "test-secret",
    GITHUB_OAUTH_URL: fake.url,
    GITHUB_API_URL: fake.apiUrl,
    ...overrides,
  });
}

async function caught(promise: Promise<unknown>): Promise<unknown> {
  try {
    await promise;
  } catch (error) {
    return error;
  }
  throw new Error("expected the call to throw");
}

/** The first leg: the app's redirect to the provider, and the state cookie it set. */
async function start(auth = createAuthenticator(db, config())) {
  const response = (await caught(auth.authenticate("github", new Request(`${APP_URL}/auth/github`, { method: "POST" })))) as Response;
  expect(response).toBeInstanceOf(Response);
  const location = new URL(response.headers.get("Location")!);
  const cookie = response.headers.get("Set-Cookie")!.split(";")[0];
  return { auth, response, location, cookie };
}

/** The person's choice on the stand-in's page: where it sends the browser back to. */
async function choose(location: URL, form: Record<string, string>): Promise<URL> {
  const body = new URLSearchParams({
    client_id: location.searchParams.get("client_id")!,
    redirect_uri: location.searchParams.get("redirect_uri")!,
    state: location.searchParams.get("state")!,
    ...form,
  });
  const response = await fetch(`${fake.url}/login/oauth/authorize`, { method: "POST", body, redirect: "manual" });
  expect(response.status).toBe(302);
  return new URL(response.headers.get("Location")!);
}

describe("sign-in through the local GitHub stand-in", () => {
  it("redirects to the stand-in with the client id, the callback and a fresh state kept in an httpOnly cookie", async () => {
    const { response, location, cookie } = await start();
    expect(response.status).toBe(302);
    expect(`${location.origin}${location.pathname}`).toBe(`${fake.url}/login/oauth/authorize`);
    expect(location.searchParams.get("client_id")).toBe("test-client");
    expect(location.searchParams.get("redirect_uri")).toBe(`${APP_URL}/auth/github/callback`);
    const state = location.searchParams.get("state")!;
    expect(state.length).toBeGreaterThanOrEqual(20);
    expect(cookie).toBe(`${OAUTH_STATE_COOKIE}=state=${state}`);
    expect(response.headers.get("Set-Cookie")).toMatch(/HttpOnly/);
    const second = await start();
    expect(second.location.searchParams.get("state")).not.toBe(state);
  });

  it("shows the demo accounts, then signs in the chosen one and stores their profile", async () => {
    const { auth, location, cookie } = await start();
    const page = await (await fetch(location)).text();
    for (const role of ["owner", "editor", "viewer"] as const) expect(page).toContain(demoPerson(role).name);
    const editor = demoPerson("editor");
    const callback = await choose(location, { login: editor.login });
    expect(`${callback.origin}${callback.pathname}`).toBe(`${APP_URL}/auth/github/callback`);
    expect(callback.searchParams.get("state")).toBe(location.searchParams.get("state"));
    const user = await auth.authenticate("github", new Request(callback, { headers: { Cookie: cookie } }));
    expect(user).toMatchObject({ githubId: editor.githubId, login: editor.login, name: editor.name, email: editor.email });
    expect(await getUser(db, user.id)).toMatchObject({ login: editor.login });

    // The code is single-use: replaying the callback fails at the token exchange.
    const replay = await caught(auth.authenticate("github", new Request(callback, { headers: { Cookie: cookie } })));
    expect(replay).toBeInstanceOf(OAuth2RequestError);
    expect((replay as OAuth2RequestError).code).toBe("bad_verification_code");
  });

  it("keeps the state check on: a callback whose state differs from the cookie's, or has no cookie, is refused", async () => {
    const first = await start();
    const second = await start();
    const callback = await choose(first.location, { login: demoPerson("viewer").login });
    const mismatch = await caught(first.auth.authenticate("github", new Request(callback, { headers: { Cookie: second.cookie } })));
    expect(mismatch).toBeInstanceOf(RangeError);
    expect((mismatch as Error).message).toMatch(/State in URL doesn't match state in cookie/);
    const missing = await caught(first.auth.authenticate("github", new Request(callback)));
    expect(missing).toBeInstanceOf(ReferenceError);
  });

  it("reports a cancelled sign-in as access_denied", async () => {
    const { auth, location, cookie } = await start();
    const callback = await choose(location, { deny: "1" });
    const error = await caught(auth.authenticate("github", new Request(callback, { headers: { Cookie: cookie } })));
    expect(error).toBeInstanceOf(OAuth2RequestError);
    expect((error as OAuth2RequestError).code).toBe("access_denied");
  });

  it("is refused by the stand-in when the app's client secret is wrong", async () => {
    const { auth, location, cookie } = await start(createAuthenticator(db, config({ GITHUB_CLIENT_SECRET: "wrong" })));
    const callback = await choose(location, { login: demoPerson("owner").login });
    const error = await caught(auth.authenticate("github", new Request(callback, { headers: { Cookie: cookie } })));
    expect((error as OAuth2RequestError).code).toBe("invalid_client");
  });
});

describe("production configuration", () => {
  it("uses the stock strategy against github.com when no stand-in is configured", async () => {
    const auth = createAuthenticator(db, config({ GITHUB_OAUTH_URL: undefined, GITHUB_API_URL: undefined }));
    const { location } = await start(auth);
    expect(`${location.origin}${location.pathname}`).toBe("https://github.com/login/oauth/authorize");
    expect(location.searchParams.get("scope")).toBe("read:user user:email");
  });

  it("signs a person in through the stock client's own code exchange and profile calls, answered by the stand-in", async () => {
    // The production path, unchanged: remix-auth-github's strategy with arctic's GitHub client (github.com's URLs
    // built in) and our profile reader on api.github.com. Only the network is redirected, at fetch: github.com and
    // api.github.com go to the stand-in, and anything else off this machine fails the test.
    const realFetch = globalThis.fetch;
    const calls: string[] = [];
    globalThis.fetch = async (input: RequestInfo | URL, init?: RequestInit) => {
      const request = new Request(input, init);
      const url = new URL(request.url);
      const base = url.origin === "https://github.com" ? fake.url : url.origin === "https://api.github.com" ? fake.apiUrl : null;
      if (base) calls.push(`${request.method} ${url.origin}${url.pathname}`);
      if (!base && url.hostname !== "127.0.0.1") throw new Error(`the test allows no request to ${url.origin}`);
      if (!base) return realFetch(request);
      const body = request.method === "GET" || request.method === "HEAD" ? undefined : await request.arrayBuffer();
      return realFetch(`${base}${url.pathname}${url.search}`, { method: request.method, headers: request.headers, body });
    };
    try {
      const auth = createAuthenticator(db, config({ GITHUB_OAUTH_URL: undefined, GITHUB_API_URL: undefined }));
      const { location, cookie } = await start(auth);
      // The person chooses at the (stand-in's) authorize page, as a browser would after the redirect to github.com.
      const standIn = new URL(`${fake.url}${location.pathname}${location.search}`);
      const callback = await choose(standIn, { login: demoPerson("owner").login });
      const user = await auth.authenticate("github", new Request(callback, { headers: { Cookie: cookie } }));
      expect(user).toMatchObject({ login: demoPerson("owner").login, githubId: demoPerson("owner").githubId });
      expect(calls).toEqual(["POST https://github.com/login/oauth/access_token", "GET https://api.github.com/user"]);
    } finally {
      globalThis.fetch = realFetch;
    }
  });
});
