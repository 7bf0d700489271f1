/**
 * Signing in over HTTP, the way a browser does it (the app's form, the stand-in's chooser, the callback): a new
 * session id every time (a planted cookie is worth nothing), the return address kept through the round trip only
 * when it stays on this app, and a limit on how often one address may try.
 */
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { createDb } from "../../app/db/client.server.ts";
import { sessions } from "../../app/db/schema.ts";
import { hashSessionId } from "../../app/sessions.server.ts";
import { startFakeGitHub, type FakeGitHub } from "../../scripts/fakes/oauth.ts";
import { makeUser } from "../factories.ts";
import { startApp, type AppProcess } from "../support/appServer.ts";
import { client, offerAccount, signInOverHttp, type Client } from "../support/http.ts";

const db = createDb(process.env.DATABASE_URL!, { max: 2 });
afterAll(() => db.$client.end());

/** The raw session id inside the signed session cookie. */
function sessionId(c: Client): string {
  const [name, value] = [...c.jar.cookies].find(([n]) => n === "skewsmith_session" || n === "__Host-skewsmith") ?? [];
  if (!name) throw new Error("no session cookie");
  const decoded = decodeURIComponent(value!);
  return JSON.parse(Buffer.from(decoded.slice(0, decoded.lastIndexOf(".")), "base64").toString("utf8"));
}

describe("a new session at every sign-in", () => {
  it("replaces a session cookie someone planted in the browser, and ends that session on the server", async () => {
    const [attacker, victim] = [await makeUser(db), await makeUser(db)];
    for (const u of [attacker, victim]) await offerAccount(inject("githubUrl"), u);
    // The attacker signs in and plants their own session cookie in the victim's browser (session fixation).
    const theirs = client(inject("appUrl"));
    await signInOverHttp(theirs, inject("githubUrl"), attacker.login);
    const planted = sessionId(theirs);
    const browser = client(inject("appUrl"));
    for (const [k, v] of theirs.jar.cookies) browser.jar.cookies.set(k, v);
    // The victim signs in in that browser.
    const done = await signInOverHttp(browser, inject("githubUrl"), victim.login);
    expect(done.status).toBe(302);
    const fresh = sessionId(browser);
    expect(fresh).not.toBe(planted);
    expect(fresh).toMatch(/^[A-Za-z0-9_-]{43}$/);
    expect(
      await db
        .select()
        .from(sessions)
        .where(eq(sessions.idHash, hashSessionId(planted))),
    ).toEqual([]);
    const [row] = await db
      .select()
      .from(sessions)
      .where(eq(sessions.idHash, hashSessionId(fresh)));
    expect(row.userId).toBe(victim.id);
    // The planted cookie now opens nothing; the victim's is theirs alone.
    expect((await theirs.fetch("/")).status).toBe(302);
    const home = await (await browser.fetch("/")).text();
    expect(home).toContain(victim.login);
    expect(home).not.toContain(attacker.login);
  });

  it("gives the same person a different id on each sign-in", async () => {
    const person = await makeUser(db);
    await offerAccount(inject("githubUrl"), person);
    const ids = new Set<string>();
    for (let i = 0; i < 3; i++) {
      const c = client(inject("appUrl"));
      await signInOverHttp(c, inject("githubUrl"), person.login);
      ids.add(sessionId(c));
    }
    expect(ids.size).toBe(3);
  });
});

describe("the return address through the round trip", () => {
  it("follows a path on this app, and sends everything else home; the cookie that carries it stays small", async () => {
    const person = await makeUser(db);
    await offerAccount(inject("githubUrl"), person);
    const cases: [string, string][] = [
      ["/teams/new?x=1#top", "/teams/new?x=1#top"],
      ["//evil.example/", "/"],
      ["/\\evil.example", "/"],
      ["/\t/evil.example", "/"],
      ["https://evil.example/", "/"],
      ["/%2F%2Fevil.example", "/"],
      ["/sign-out", "/"],
      [`/${"a".repeat(5000)}`, "/"],
    ];
    for (const [next, expected] of cases) {
      const c = client(inject("appUrl"));
      const start = await c.post("/auth/github", { next });
      const carried = start.headers.getSetCookie().find((s) => s.startsWith("skewsmith_next="))!;
      expect(carried.length, next).toBeLessThan(1024);
      const done = await signInOverHttp(c, inject("githubUrl"), person.login, next);
      expect(done.headers.get("Location"), JSON.stringify(next)).toBe(expected);
    }
  });
});

describe("the sign-in rate limit", () => {
  let github: FakeGitHub;
  let app: AppProcess;
  beforeAll(async () => {
    github = await startFakeGitHub({ clientId: "limits", clientSecret: "limits-secret" });
    app = await startApp({
      databaseUrl: process.env.DATABASE_URL!,
      env: {
        GITHUB_CLIENT_ID: "limits",
        GITHUB_CLIENT_SECRET: "limits-secret",
        GITHUB_OAUTH_URL: github.url,
        GITHUB_API_URL: github.apiUrl,
        RATE_LIMIT_SIGN_IN: "3/600",
      },
    });
  });
  afterAll(async () => {
    await app?.stop();
    await github?.close();
  });

  it("refuses an address that tries too often with 429, Retry-After and when to try again; starts and callbacks both count", async () => {
    const c = client(app.url);
    for (let i = 0; i < 3; i++) expect((await c.post("/auth/github", { next: "/" })).status).toBe(302);
    const refused = await c.post("/auth/github", { next: "/" });
    expect(refused.status).toBe(429);
    expect(Number(refused.headers.get("Retry-After"))).toBeGreaterThan(100);
    expect(await refused.text()).toMatch(/Too many sign-in attempts from here in a short time\. Wait \d+ seconds and try again\./);
    const callback = await c.fetch("/auth/github/callback?code=x&state=y");
    expect(callback.status).toBe(429);
    // Other pages are not limited.
    expect((await c.fetch("/sign-in")).status).toBe(200);
  });
});
