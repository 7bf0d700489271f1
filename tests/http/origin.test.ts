/**
 * Cross-site request forgery: every state-changing request, pages, the data requests the app's scripts make,
 * routes without a page (sign-out, the OAuth start) and whatever comes later (the API), must come from the app's
 * own origin. A request with a bearer token and no cookie is the exception (no ambient credential to abuse).
 */
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { createDb } from "../../app/db/client.server.ts";
import { createApiToken } from "../../app/models/apiTokens.server.ts";
import { makeWorld, snapshot, type World } from "../support/world.ts";

const db = createDb(process.env.DATABASE_URL!, { max: 2 });
let world: World;
let token: { id: string; secret: string };
beforeAll(async () => {
  world = await makeWorld(db, inject("appUrl"), inject("githubUrl"));
  const made = await createApiToken(db, { userId: world.owner.id, name: "Origin test", scope: "write", expiresAt: null });
  token = { id: made.item.id, secret: made.token };
});
afterAll(() => db.$client.end());

/** Requests that would change something if they were let through (the owner may make every one of them). */
const CHANGES = (w: World): [string, Record<string, string>][] => [
  ["/teams/new", { intent: "create-team", name: "Forged team" }],
  [`/teams/${w.team.id}`, { intent: "rename-team", name: "Forged name", version: String(w.team.version) }],
  [`/teams/${w.team.id}/members`, { intent: "remove-member", userId: w.viewer.id }],
  [`/projects/${w.project.id}`, { intent: "create-effect", name: "Forged effect" }],
  [`/projects/${w.project.id}`, { intent: "archive-project" }],
  [`/projects/${w.project.id}.data`, { intent: "delete-effect", effectId: w.effect.id }],
  [`/effects/${w.effect.id}`, { intent: "save", version: String(w.effect.version), canvasWidth: "8" }],
  [`/projects/${w.project.id}/sprites`, { intent: "upload-sprite", name: "Forged sprite" }],
  [
    `/projects/${w.project.id}/sprites`,
    { intent: "rename-sprite", spriteId: w.sprite.id, name: "Forged", version: String(w.sprite.version) },
  ],
  [`/projects/${w.project.id}/sprites`, { intent: "delete-sprite", spriteId: w.sprite.id, version: String(w.sprite.version) }],
  [`/teams/${w.team.id}/profiles/new`, { name: "Forged profile" }],
  [`/teams/${w.team.id}/profiles`, { intent: "duplicate-profile", profileId: w.profile.id }],
  [`/teams/${w.team.id}/profiles/${w.profile.id}`, { intent: "save-profile", name: "Forged", version: String(w.profile.version) }],
  [`/teams/${w.team.id}/profiles/${w.profile.id}`, { intent: "delete-profile", confirmed: "yes", version: String(w.profile.version) }],
  [`/teams/${w.team.id}/profiles/${w.profile.id}/delete`, { intent: "delete-profile", confirmed: "yes" }],
  [`/teams/${w.team.id}/members`, { intent: "invite", email: "forged@example.com", role: "owner" }],
  [`/teams/${w.team.id}/members/${w.viewer.id}/remove`, { intent: "remove-member", userId: w.viewer.id }],
  ["/settings", { intent: "create-token", name: "Forged token", scope: "write" }],
  ["/settings", { intent: "revoke-token", tokenId: token.id }],
  ["/sign-out", {}],
  ["/auth/github", { next: "/" }],
];

const HOSTILE: [string, Record<string, string>][] = [
  ["no Origin and no Sec-Fetch-Site", {}],
  ["another site's Origin", { Origin: "https://evil.example" }],
  ["a null Origin (a sandboxed frame, a data: page)", { Origin: "null" }],
  ["the app's host on another scheme", { Origin: "https://127.0.0.1" }],
  ["Sec-Fetch-Site: cross-site", { "Sec-Fetch-Site": "cross-site" }],
  ["Sec-Fetch-Site: same-site (a sibling subdomain)", { "Sec-Fetch-Site": "same-site" }],
  ["a foreign Origin with a same-origin Sec-Fetch-Site", { Origin: "https://evil.example", "Sec-Fetch-Site": "same-origin" }],
];

describe("a state-changing request from anywhere but the app's own pages", () => {
  it.each(HOSTILE)("is refused (403, with a reason) and changes nothing: %s", async (_what, headers) => {
    const before = await snapshot(db, world);
    for (const [path, form] of CHANGES(world)) {
      const response = await world.as.owner.post(path, form, { origin: null, headers });
      expect(response.status, `${path} ${form.intent ?? ""}`).toBe(403);
      const text = await response.text();
      expect(text, path).toMatch(/so it was refused/);
      expect(response.headers.get("Location")).toBeNull();
    }
    expect(await snapshot(db, world)).toBe(before);
    // The owner is still signed in: the forged sign-out did nothing.
    expect((await world.as.owner.fetch("/")).status).toBe(200);
  });

  it.each(HOSTILE)("to the JSON API with the session cookie is refused (403, JSON) and changes nothing: %s", async (_what, headers) => {
    const before = await snapshot(db, world);
    const calls: [string, string, unknown][] = [
      ["POST", "/api/v1/tokens", { name: "Forged token", scope: "write" }],
      ["DELETE", `/api/v1/tokens/${token.id}`, undefined],
      ["PUT", `/api/v1/effects/${world.effect.id}`, { version: world.effect.version, document: { canvas: { width: 8, height: 8 } } }],
      ["POST", "/api/v1/tables", { canvas: { width: 8, height: 8 }, pivot: { x: 4, y: 4 }, angles: { list: [0, 45] } }],
    ];
    for (const [method, path, body] of calls) {
      const response = await world.as.owner.fetch(path, {
        method,
        origin: null,
        headers: { ...headers, "Content-Type": "application/json" },
        body: body === undefined ? undefined : JSON.stringify(body),
      });
      expect(response.status, `${method} ${path}`).toBe(403);
      const answer = (await response.json()) as { error: { message: string } };
      expect(answer.error.message, path).toMatch(/so it was refused/);
    }
    expect(await snapshot(db, world)).toBe(before);
    // The same call with the token alone (no cookie) is let through.
    const byToken = await fetch(`${inject("appUrl")}/api/v1/tables`, {
      method: "POST",
      headers: { Authorization: `Bearer ${token.secret}`, "Content-Type": "application/json" },
      body: JSON.stringify({ canvas: { width: 8, height: 8 }, pivot: { x: 4, y: 4 }, angles: { list: [0, 45] } }),
    });
    expect(byToken.status).toBe(200);
  });

  it("is let through from the app's origin, or with Sec-Fetch-Site: same-origin when a browser sends no Origin", async () => {
    const byOrigin = await world.as.owner.post(`/projects/${world.project.id}`, { intent: "create-effect", name: "Made at home" });
    expect(byOrigin.status).toBe(200);
    const byFetchMetadata = await world.as.owner.post(
      `/projects/${world.project.id}`,
      { intent: "create-effect", name: "Made at home too" },
      { origin: null, headers: { "Sec-Fetch-Site": "same-origin" } },
    );
    expect(byFetchMetadata.status).toBe(200);
  });

  it("exempts a bearer token sent without cookies: it reaches the route (which then asks for a session)", async () => {
    const response = await fetch(`${inject("appUrl")}/teams/new`, {
      method: "POST",
      headers: { Authorization: "Bearer not-a-real-token", "Content-Type": "application/x-www-form-urlencoded" },
      body: "intent=create-team&name=Token+team",
      redirect: "manual",
    });
    // Not refused by the origin check: the route's own guard sends a visitor without a session to sign in.
    expect(response.status).toBe(302);
    expect(response.headers.get("Location")).toMatch(/^\/sign-in\?next=/);
    // With a cookie as well, the token exempts nothing.
    const withCookie = await world.as.owner.post(
      "/teams/new",
      { intent: "create-team", name: "Token team" },
      {
        origin: null,
        headers: { Authorization: "Bearer not-a-real-token" },
      },
    );
    expect(withCookie.status).toBe(403);
  });

  it("answers a refused data request (the app's scripts) in JSON with the request id", async () => {
    const response = await world.as.owner.post(
      `/projects/${world.project.id}.data`,
      { intent: "archive-project" },
      { origin: "https://evil.example" },
    );
    expect(response.status).toBe(403);
    const body = (await response.json()) as { error: { message: string; requestId: string } };
    expect(body.error.message).toMatch(/another site \(https:\/\/evil\.example\)/);
    expect(body.error.requestId).toBe(response.headers.get("X-Request-Id"));
  });
});
