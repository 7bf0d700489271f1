/* eslint-disable @typescript-eslint/no-explicit-any -- the JSON answers are read field by field, and the assertions check them */
/**
 * The JSON API under /api/v1 against the running app: credentials, token scopes and team roles on every route,
 * version conflicts, the tables endpoint against the CLI, token management, and the shape of every error.
 */
import { execFile } from "node:child_process";
import { createHash } from "node:crypto";
import { request } from "node:http";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { eq } from "drizzle-orm";
import { unzipSync } from "fflate";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createDb } from "../../app/db/client.server.ts";
import { apiTokens, type EffectRow, type Project, type Team, type User } from "../../app/db/schema.ts";
import { createApiToken, revokeApiToken } from "../../app/models/apiTokens.server.ts";
import { getEffect } from "../../app/models/effects.server.ts";
import type { TokenScope } from "../../app/tokens.ts";
import { makeEffect, makeProject, makeTeam, makeUser } from "../factories.ts";
import { sessionCookie } from "./session.ts";
import { appUrl } from "./support.ts";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../..");
const db = createDb(process.env.DATABASE_URL!, { max: 2 });
afterAll(() => db.$client.end());

const DOC = { canvas: { width: 16, height: 12 }, pivot: { x: 8, y: 6 }, angles: { sweep: { from: 0, to: 90, frames: 4 } } };

interface Call {
  token?: string;
  cookie?: string;
  origin?: string;
  authorization?: string;
  body?: unknown;
  raw?: string;
  contentType?: string;
  headers?: Record<string, string>;
}

async function call(
  method: string,
  url: string,
  options: Call = {},
): Promise<{ status: number; headers: Headers; text: string; json: any }> {
  const headers: Record<string, string> = { ...options.headers };
  if (options.token) headers.Authorization = `Bearer ${options.token}`;
  if (options.authorization) headers.Authorization = options.authorization;
  if (options.cookie) headers.Cookie = options.cookie;
  if (options.origin) headers.Origin = options.origin;
  let body: string | undefined;
  if (options.body !== undefined || options.raw !== undefined) {
    headers["Content-Type"] = options.contentType ?? "application/json";
    body = options.raw ?? JSON.stringify(options.body);
  }
  const res = await fetch(`${appUrl()}${url}`, { method, headers, body, redirect: "manual" });
  const text = method === "HEAD" ? "" : res.headers.get("Content-Type")?.includes("zip") ? "" : await res.text();
  let json: unknown;
  try {
    json = text ? JSON.parse(text) : null;
  } catch {
    json = null;
  }
  return { status: res.status, headers: res.headers, text, json };
}

/** Every error is JSON with a message, and field null or a string, never an HTML page. */
function expectError(res: Awaited<ReturnType<typeof call>>, status: number, message?: RegExp) {
  expect(res.status, res.text).toBe(status);
  expect(res.headers.get("Content-Type")).toMatch(/^application\/json/);
  expect(Object.keys(res.json)).toEqual(["error"]);
  expect(typeof res.json.error.message).toBe("string");
  expect(res.json.error.field === null || typeof res.json.error.field === "string").toBe(true);
  if (message) expect(res.json.error.message).toMatch(message);
}

const token = async (user: User, scope: TokenScope, expiresAt: Date | null = null) =>
  (await createApiToken(db, { userId: user.id, name: `t ${scope} ${Math.random()}`, scope, expiresAt })).token;

let owner: User, editor: User, viewer: User, outsider: User;
let team: Team, project: Project, effect: EffectRow;
const tokens = {} as Record<
  "ownerRead" | "ownerWrite" | "editorRead" | "editorWrite" | "viewerWrite" | "outsiderWrite" | "revoked" | "expired",
  string
>;

beforeAll(async () => {
  [owner, editor, viewer, outsider] = [await makeUser(db), await makeUser(db), await makeUser(db), await makeUser(db)];
  team = await makeTeam(db, {
    owner,
    members: [
      { user: editor, role: "editor" },
      { user: viewer, role: "viewer" },
    ],
  });
  await makeTeam(db, { owner: outsider });
  project = await makeProject(db, { team, actor: owner, name: "API quay" });
  effect = await makeEffect(db, { project, actor: owner, name: "Lamp", document: DOC });
  tokens.ownerRead = await token(owner, "read");
  tokens.ownerWrite = await token(owner, "write");
  tokens.editorRead = await token(editor, "read");
  tokens.editorWrite = await token(editor, "write");
  tokens.viewerWrite = await token(viewer, "write");
  tokens.outsiderWrite = await token(outsider, "write");
  const revoked = await createApiToken(db, { userId: owner.id, name: "soon revoked", scope: "write", expiresAt: null });
  await revokeApiToken(db, { userId: owner.id, tokenId: revoked.item.id });
  tokens.revoked = revoked.token;
  tokens.expired = await token(owner, "write", new Date(Date.now() - 1000));
});

/** Reads are allowed to every member with any valid token; this lists them with what a good answer holds. */
const readRoutes = () => [
  { path: "/api/v1", check: (j: any) => expect(j.api).toBe("skewsmith/v1") },
  { path: "/api/v1/teams", check: () => {} },
  {
    path: `/api/v1/teams/${team.id}/projects`,
    check: (j: any) => expect(j.projects.map((p: any) => p.id)).toContain(project.id),
    scoped: true,
  },
  {
    path: `/api/v1/projects/${project.id}/effects`,
    check: (j: any) => expect(j.effects.map((e: any) => e.id)).toContain(effect.id),
    scoped: true,
  },
  { path: `/api/v1/effects/${effect.id}`, check: (j: any) => expect(j.document.format).toBe("skewsmith.effect/1"), scoped: true },
  { path: `/api/v1/effects/${effect.id}/export.zip`, check: () => {}, scoped: true, zip: true },
  { path: `/api/v1/projects/${project.id}/export.zip`, check: () => {}, scoped: true, zip: true },
  { path: "/api/v1/tokens", check: (j: any) => expect(Array.isArray(j.tokens)).toBe(true) },
];

describe("credentials", () => {
  it("every route answers 401 in JSON without credentials, or with a wrong, revoked, expired or malformed token", async () => {
    const routes = [
      ...readRoutes().map((r) => ["GET", r.path] as const),
      ["PUT", `/api/v1/effects/${effect.id}`] as const,
      ["POST", "/api/v1/tables"] as const,
      ["POST", "/api/v1/tokens"] as const,
    ];
    const bad: [Call, RegExp][] = [
      [{}, /Sign in, or send an API token/],
      [{ token: "sks_0000000000000000000000000000000000000000000" }, /not valid/],
      [{ token: tokens.revoked }, /revoked/],
      [{ token: tokens.expired }, /expired/],
      [{ authorization: `Basic ${Buffer.from("a:b").toString("base64")}` }, /must be “Bearer <token>”/],
      [{ authorization: "Bearer" }, /must be “Bearer <token>”/],
    ];
    for (const [method, url] of routes)
      for (const [options, message] of bad) {
        const res = await call(method, url, { ...options, body: method === "GET" ? undefined : DOC });
        expectError(res, 401, message);
        expect(res.headers.get("WWW-Authenticate")).toBe('Bearer realm="skewsmith"');
      }
    // Nothing was saved by any of those PUTs.
    expect((await getEffect(db, effect.id))!.version).toBe(1);
  });
});

describe("reading", () => {
  it("lets every member read every route with a read token, and an outsider gets the same 404 as for an id that is not there", async () => {
    for (const t of [tokens.ownerRead, tokens.editorRead, tokens.viewerWrite]) {
      for (const r of readRoutes()) {
        const res = await call("GET", r.path, { token: t });
        expect(res.status, `${r.path}: ${res.text}`).toBe(200);
        if (r.zip) expect(res.headers.get("Content-Type")).toBe("application/zip");
        else r.check(res.json);
      }
    }
    const teams = await call("GET", "/api/v1/teams", { token: tokens.editorRead });
    expect(teams.json.teams).toEqual([expect.objectContaining({ id: team.id, role: "editor" })]);

    const missing = {
      [`/api/v1/teams/${team.id}/projects`]: `/api/v1/teams/00000000-0000-4000-8000-000000000000/projects`,
      [`/api/v1/projects/${project.id}/effects`]: `/api/v1/projects/00000000-0000-4000-8000-000000000000/effects`,
      [`/api/v1/effects/${effect.id}`]: `/api/v1/effects/00000000-0000-4000-8000-000000000000`,
      [`/api/v1/effects/${effect.id}/export.zip`]: `/api/v1/effects/not-a-uuid/export.zip`,
      [`/api/v1/projects/${project.id}/export.zip`]: `/api/v1/projects/00000000-0000-4000-8000-000000000000/export.zip`,
    };
    for (const [mine, absent] of Object.entries(missing)) {
      const theirs = await call("GET", mine, { token: tokens.outsiderWrite });
      const none = await call("GET", absent, { token: tokens.ownerRead });
      expectError(theirs, 404);
      expectError(none, 404);
      // The same answer, word for word; only the request ids (one per request) differ.
      const { requestId: a, ...theirError } = theirs.json.error;
      const { requestId: b, ...noneError } = none.json.error;
      expect(theirError).toEqual(noneError);
      expect(a).not.toBe(b);
    }
    const outsiderTeams = await call("GET", "/api/v1/teams", { token: tokens.outsiderWrite });
    expect(outsiderTeams.json.teams.map((t: any) => t.id)).not.toContain(team.id);
  });

  it("records a token's use, at most once a minute", async () => {
    const made = await createApiToken(db, { userId: viewer.id, name: "use counter", scope: "read", expiresAt: null });
    const t = made.token;
    const lastUsed = async () => (await db.select().from(apiTokens).where(eq(apiTokens.id, made.item.id)))[0].lastUsedAt;
    expect(await lastUsed()).toBeNull();
    await call("GET", "/api/v1", { token: t });
    const first = await lastUsed();
    expect(first).toBeInstanceOf(Date);
    await call("GET", "/api/v1/teams", { token: t });
    expect((await lastUsed())!.getTime()).toBe(first!.getTime());
  });

  it("answers a wrong method with 405 and Allow, an unknown address with a JSON 404, and HEAD like GET without a body", async () => {
    const del = await call("DELETE", "/api/v1/teams", { token: tokens.ownerWrite });
    expectError(del, 405, /DELETE is not something this address does/);
    expect(del.headers.get("Allow")).toBe("GET, HEAD");
    const post = await call("POST", `/api/v1/effects/${effect.id}`, { token: tokens.ownerWrite, body: {} });
    expectError(post, 405);
    expect(post.headers.get("Allow")).toBe("GET, PUT, HEAD");
    expectError(await call("GET", "/api/v1/tables", { token: tokens.ownerRead }), 405);
    expectError(await call("GET", "/api/v1/nowhere/at/all", { token: tokens.ownerRead }), 404, /no API address/);
    expectError(await call("POST", "/api/v1/nowhere", { token: tokens.ownerRead, body: {} }), 404);
    const head = await call("HEAD", "/api/v1/teams", { token: tokens.ownerRead });
    expect(head.status).toBe(200);
  });
});

describe("saving an effect document", () => {
  const next = (edges: string) => ({ ...DOC, edges });

  it("needs a write token and the editor role: read tokens and viewers get 403, outsiders 404, and nothing is saved", async () => {
    const fresh = await makeEffect(db, { project, actor: owner, document: DOC });
    const put = (t: string) => call("PUT", `/api/v1/effects/${fresh.id}`, { token: t, body: { version: 1, document: next("clip") } });
    expectError(await put(tokens.ownerRead), 403, /may only read/);
    expectError(await put(tokens.editorRead), 403, /may only read/);
    expectError(await put(tokens.viewerWrite), 403, /Viewers can read but not change anything/);
    expectError(await put(tokens.outsiderWrite), 404, /There is nothing here, or it belongs to a team you are not in/);
    expect((await getEffect(db, fresh.id))!.version).toBe(1);

    const saved = await put(tokens.editorWrite);
    expect(saved.status, saved.text).toBe(200);
    expect(saved.json).toMatchObject({ id: fresh.id, version: 2 });
    const read = await call("GET", `/api/v1/effects/${fresh.id}`, { token: tokens.viewerWrite });
    expect(read.json.version).toBe(2);
    expect(read.json.document.edges).toBe("clip");
    // Defaults filled in by core.
    expect(read.json.document.rounding).toBe("nearest-away");
  });

  it("lets exactly one of two saves from the same version win; the other gets 409 and nothing is lost silently", async () => {
    const fresh = await makeEffect(db, { project, actor: owner, document: DOC });
    const [a, b] = await Promise.all([
      call("PUT", `/api/v1/effects/${fresh.id}`, { token: tokens.editorWrite, body: { version: 1, document: next("clip") } }),
      call("PUT", `/api/v1/effects/${fresh.id}`, { token: tokens.ownerWrite, body: { version: 1, document: next("wrap") } }),
    ]);
    expect([a.status, b.status].sort()).toEqual([200, 409]);
    const [won, lost] = a.status === 200 ? [a, b] : [b, a];
    expect(won.json.version).toBe(2);
    expectError(lost, 409, /Someone saved this effect after you opened it/);
    const stored = (await getEffect(db, fresh.id))!;
    expect(stored.version).toBe(2);
    expect(stored.document.edges).toBe(won === a ? "clip" : "wrap");
    // A later save from the stale version is refused too; from the current one it goes through.
    expectError(await call("PUT", `/api/v1/effects/${fresh.id}`, { token: tokens.ownerWrite, body: { version: 1, document: DOC } }), 409);
    const third = await call("PUT", `/api/v1/effects/${fresh.id}`, { token: tokens.ownerWrite, body: { version: 2, document: DOC } });
    expect(third.json.version).toBe(3);
  });

  it("answers a bad body with 400 (or 415) naming the field, and saves nothing", async () => {
    const fresh = await makeEffect(db, { project, actor: owner, document: DOC });
    const url = `/api/v1/effects/${fresh.id}`;
    const t = tokens.editorWrite;
    expectError(await call("PUT", url, { token: t, raw: "version=1", contentType: "application/x-www-form-urlencoded" }), 415);
    expectError(await call("PUT", url, { token: t, raw: '{"version": 1, ' }), 400, /not valid JSON/);
    expectError(await call("PUT", url, { token: t, raw: "[1,2]" }), 400);
    const cases: [unknown, string][] = [
      [{ document: DOC }, "version"],
      [{ version: "1", document: DOC }, "version"],
      [{ version: 1.5, document: DOC }, "version"],
      [{ version: 0, document: DOC }, "version"],
      [{ version: 1 }, "document"],
      [{ version: 1, document: { ...DOC, canvas: { width: 0, height: 12 } } }, "document.canvas.width"],
      [{ version: 1, document: { ...DOC, bogus: 1 } }, "document"],
      [{ version: 1, document: "not an object" }, "document"],
    ];
    for (const [body, field] of cases) {
      const res = await call("PUT", url, { token: t, body });
      expectError(res, 400);
      expect(res.json.error.field, JSON.stringify(body)).toBe(field);
    }
    const extra = await call("PUT", url, { token: t, body: { version: 1, document: DOC, force: true } });
    expectError(extra, 400, /unknown field “force”/);
    expect((await getEffect(db, fresh.id))!.version).toBe(1);
  });

  it("with the session cookie, takes changes only from this app's own origin", async () => {
    const fresh = await makeEffect(db, { project, actor: owner, document: DOC });
    const cookie = await sessionCookie(editor);
    const url = `/api/v1/effects/${fresh.id}`;
    const body = { version: 1, document: next("clip") };
    expect((await call("GET", url, { cookie })).status).toBe(200);
    expectError(await call("PUT", url, { cookie, body }), 403, /does not say which site sent it \(no Origin header\)/);
    expectError(
      await call("PUT", url, { cookie, body, origin: "https://elsewhere.example" }),
      403,
      /another site \(https:\/\/elsewhere.example\)/,
    );
    // A token from a browser page elsewhere is refused too; with no Origin (a build) it goes through.
    expectError(await call("PUT", url, { token: tokens.editorWrite, body, origin: "https://elsewhere.example" }), 403);
    expect((await getEffect(db, fresh.id))!.version).toBe(1);
    const ok = await call("PUT", url, { cookie, body, origin: appUrl() });
    expect(ok.status, ok.text).toBe(200);
    expect(ok.json.version).toBe(2);
  });
});

function runCli(args: string[], cwd: string): Promise<{ code: number; stdout: string; stderr: string }> {
  return new Promise((resolve) => {
    execFile(
      path.join(ROOT, "node_modules/.bin/skewsmith"),
      args,
      { cwd, encoding: "utf8", maxBuffer: 64 << 20 },
      (error, stdout, stderr) => resolve({ code: error ? (typeof error.code === "number" ? error.code : -1) : 0, stdout, stderr }),
    );
  });
}

describe("POST /api/v1/tables", () => {
  it("answers exactly the bytes `skewsmith tables` prints for the same document, plain and pretty", async () => {
    const dir = mkdtempSync(path.join(tmpdir(), "skewsmith-api-tables-"));
    try {
      const doc = { canvas: { width: 20, height: 14 }, pivot: { x: 9.5, y: 7 }, angles: { list: [0, 12.5, 90, 181, -45] }, edges: "clip" };
      writeFileSync(path.join(dir, "fx.json"), JSON.stringify(doc));
      for (const pretty of [false, true]) {
        const cli = await runCli(["tables", "fx.json", ...(pretty ? ["--pretty"] : [])], dir);
        expect(cli.code, cli.stderr).toBe(0);
        const api = await call("POST", `/api/v1/tables${pretty ? "?pretty" : ""}`, { token: tokens.viewerWrite, body: doc });
        expect(api.status).toBe(200);
        expect(api.headers.get("Content-Type")).toMatch(/^application\/json/);
        expect(api.text).toBe(cli.stdout);
      }
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it("refuses a bad document with the core's message and field, and an effect too big to measure on the server", async () => {
    const bad = await call("POST", "/api/v1/tables", { token: tokens.ownerRead, body: { ...DOC, pivot: { x: 8.25, y: 6 } } });
    expectError(bad, 400, /pivot\.x/);
    expect(bad.json.error.field).toBe("pivot.x");
    const huge = await call("POST", "/api/v1/tables", {
      token: tokens.ownerRead,
      body: { canvas: { width: 4096, height: 4096 }, pivot: { x: 0, y: 0 }, angles: { sweep: { from: 0, to: 360, frames: 4096 } } },
    });
    expectError(huge, 400, /Run `skewsmith tables` locally/);
    // An oversize body, on a connection of its own: the server answers before reading it all, then closes it.
    const oversize = await new Promise<{ status: number; body: string }>((resolve, reject) => {
      const req = request(
        `${appUrl()}/api/v1/tables`,
        {
          method: "POST",
          agent: false,
          headers: { Authorization: `Bearer ${tokens.ownerRead}`, "Content-Type": "application/json", Connection: "close" },
        },
        (res) => {
          let body = "";
          res.on("data", (c) => (body += c));
          res.on("end", () => resolve({ status: res.statusCode!, body }));
        },
      );
      // Writing the rest may fail once the server has answered and closed; the answer is what counts.
      req.on("error", (error) => setTimeout(() => reject(error), 2000));
      req.end("x".repeat(2 * 1024 * 1024));
    });
    expect(oversize.status).toBe(413);
    expect(JSON.parse(oversize.body).error.message).toMatch(/at most 1048576/);
  });
});

describe("export bundles over the API", () => {
  it("are the same zip as the session download, with its ETag, 304 when unchanged, and 400 naming a bad option", async () => {
    const url = `/api/v1/effects/${effect.id}/export.zip?outputs=c,6502&label=lamp`;
    const res = await fetch(`${appUrl()}${url}`, { headers: { Authorization: `Bearer ${tokens.viewerWrite}` } });
    expect(res.status).toBe(200);
    const etag = res.headers.get("ETag")!;
    const zip = new Uint8Array(await res.arrayBuffer());
    expect(Object.keys(unzipSync(zip)).sort()).toEqual(["README.txt", "lamp.6502.s", "lamp.c", "lamp.effect.json", "lamp.h"]);
    expect(res.headers.get("Content-Digest")).toBe(`sha-256=:${createHash("sha256").update(zip).digest("base64")}:`);
    const again = await fetch(`${appUrl()}${url}`, { headers: { Authorization: `Bearer ${tokens.ownerRead}`, "If-None-Match": etag } });
    expect(again.status).toBe(304);
    const other = await fetch(`${appUrl()}${url}&sign=scroll`, {
      headers: { Authorization: `Bearer ${tokens.ownerRead}`, "If-None-Match": etag },
    });
    expect(other.status).toBe(200);
    expect(other.headers.get("ETag")).not.toBe(etag);
    const bad = await call("GET", `/api/v1/effects/${effect.id}/export.zip?element=float`, { token: tokens.ownerRead });
    expectError(bad, 400, /element: "float" is not allowed/);
    expect(bad.json.error.field).toBe("element");
  });
});

describe("tokens over the API", () => {
  it("are made with a signed-in session only, answer 201 with the token once, and are revoked the same way", async () => {
    const person = await makeUser(db);
    await makeTeam(db, { owner: person });
    const cookie = await sessionCookie(person);
    const origin = appUrl();
    const made = await call("POST", "/api/v1/tokens", { cookie, origin, body: { name: "ci build", scope: "read" } });
    expect(made.status, made.text).toBe(201);
    expect(made.json).toMatchObject({ name: "ci build", scope: "read", state: "live", lastUsedAt: null });
    expect(Object.keys(made.json)).toEqual(expect.arrayContaining(["id", "name", "scope", "token"]));
    expect(made.json.token).toMatch(/^sks_[A-Za-z0-9_-]{43}$/);
    expect(made.headers.get("Location")).toBe(`/api/v1/tokens/${made.json.id}`);
    // Ninety days unless asked otherwise.
    expect(Math.round((Date.parse(made.json.expiresAt) - Date.parse(made.json.createdAt)) / 86_400_000)).toBe(90);

    const listed = await call("GET", "/api/v1/tokens", { token: made.json.token });
    expect(listed.json.tokens.map((t: any) => t.name)).toEqual(["ci build"]);
    expect(listed.text).not.toContain(made.json.token);
    expectError(
      await call("POST", "/api/v1/tokens", { token: made.json.token, body: { name: "sneaky", scope: "write" } }),
      403,
      /signed-in person/,
    );
    expectError(await call("DELETE", `/api/v1/tokens/${made.json.id}`, { token: made.json.token }), 403);
    expectError(await call("POST", "/api/v1/tokens", { cookie, body: { name: "no origin", scope: "read" } }), 403);

    const bad: [unknown, string, number][] = [
      [{ name: "ci build", scope: "read" }, "name", 409],
      [{ name: "", scope: "read" }, "name", 400],
      [{ name: "a\u0000b", scope: "read" }, "name", 400],
      [{ name: "x".repeat(81), scope: "read" }, "name", 400],
      [{ name: "ok", scope: "admin" }, "scope", 400],
      [{ name: "ok" }, "scope", 400],
      [{ name: "ok", scope: "read", expiresInDays: 3 }, "expiresInDays", 400],
      [{ name: "ok", scope: "read", expiresInDays: "ninety" }, "expiresInDays", 400],
      [{ name: "ok", scope: "read", admin: true }, "", 400],
      [[], "", 400],
    ];
    for (const [body, field, status] of bad) {
      const res = await call("POST", "/api/v1/tokens", { cookie, origin, body });
      expectError(res, status);
      expect(res.json.error.field ?? "", JSON.stringify(body)).toBe(field);
    }
    const forever = await call("POST", "/api/v1/tokens", {
      cookie,
      origin,
      body: { name: "forever", scope: "write", expiresInDays: null },
    });
    expect(forever.json.expiresAt).toBeNull();

    expectError(await call("GET", `/api/v1/tokens/${made.json.id}`, { token: tokens.ownerRead }), 404, /no such token/);
    const revoked = await call("DELETE", `/api/v1/tokens/${made.json.id}`, { cookie, origin });
    expect(revoked.status).toBe(200);
    expect(revoked.json.state).toBe("revoked");
    expectError(await call("GET", "/api/v1", { token: made.json.token }), 401, /revoked/);
    // The name is free again once the token is revoked.
    expect((await call("POST", "/api/v1/tokens", { cookie, origin, body: { name: "ci build", scope: "read" } })).status).toBe(201);
  });
});
