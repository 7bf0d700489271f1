/**
 * Crash and restart, on a PostgreSQL cluster and a server of this test's own (nothing else is disturbed):
 *
 *   - the server is killed (SIGKILL, no chance to clean up) while saves and exports are in flight, several times;
 *     after a restart every save is there whole or not at all, every save that was answered 200 is there, and the
 *     app serves again, with the sessions it had;
 *   - PostgreSQL stops under the running app: pages answer 503 with a clear message and a reference, saves are
 *     refused and nothing is half-written; when PostgreSQL is back, the same app process serves again.
 *
 * Save kinds in the mix: effect creation, duplication and rename, project details, the bench's document save,
 * sprite uploads; and downloads (document, page, export bundle) in flight beside them.
 */
import { rmSync } from "node:fs";
import path from "node:path";
import { and, eq, sql } from "drizzle-orm";
import { migrate } from "drizzle-orm/node-postgres/migrator";
import { randomBytes } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createDb, type Db } from "../../app/db/client.server.ts";
import { activity, effects, projects, sprites } from "../../app/db/schema.ts";
import { decodePng } from "@skewsmith/core";
import { startCluster, type Cluster } from "../../scripts/lib/cluster.ts";
import { startFakeGitHub, type FakeGitHub } from "../../scripts/fakes/oauth.ts";
import { ROOT, startApp, type AppProcess } from "../support/appServer.ts";
import { MIGRATIONS } from "../support/db.ts";
import { errorMessageOf, Jar, client, type Client } from "../support/http.ts";
import { makeWorld, type World } from "../support/world.ts";

let cluster: Cluster;
const clusterDir = path.join(ROOT, `.tmp/crash-pg-${process.pid}`);
let databaseUrl: string;
let db: Db;
let github: FakeGitHub;
let world: World;
const secret = randomBytes(32).toString("hex");

async function serve(): Promise<AppProcess> {
  return startApp({
    databaseUrl,
    env: {
      SESSION_SECRET: secret,
      GITHUB_CLIENT_ID: "crash",
      GITHUB_CLIENT_SECRET: "crash-secret",
      GITHUB_OAUTH_URL: github.url,
      GITHUB_API_URL: github.apiUrl,
      RATE_LIMIT_SIGN_IN: "1000/60",
    },
  });
}

/** The same person's cookies, against another server process (a restart moves the port). */
function at(app: AppProcess, person: Client): Client {
  const jar = new Jar();
  for (const [k, v] of person.jar.cookies) jar.cookies.set(k, v);
  return client(app.url, jar);
}

beforeAll(async () => {
  // A cluster of its own, on the first free port from a point away from the usual ones.
  cluster = await startCluster({ dir: clusterDir, port: 56200 + (process.pid % 500) });
  databaseUrl = await cluster.createDatabase("crash");
  db = createDb(databaseUrl, { max: 2 });
  await migrate(db, { migrationsFolder: MIGRATIONS });
  github = await startFakeGitHub({ clientId: "crash", clientSecret: "crash-secret" });
  const first = await serve();
  world = await makeWorld(db, first.url, github.url);
  initialWidth = (world.effect.document as { canvas?: { width?: number } }).canvas?.width;
  await first.stop();
});

afterAll(async () => {
  await github?.close();
  await db?.$client.end();
  await cluster?.stop();
  rmSync(clusterDir, { recursive: true, force: true });
});

/** The canvas widths the bench saves sent, by the version they were sent from; and the width the effect began with. */
const sentWidths = new Map<number, Set<number | undefined>>();
let initialWidth: number | undefined;

/** Every effect in the project was saved whole: each row has the activity line its save wrote in the same transaction. */
async function checkWhole(projectId: string) {
  const rows = await db.select().from(effects).where(eq(effects.projectId, projectId));
  const lines = await db.select().from(activity).where(eq(activity.projectId, projectId));
  const made = lines.filter((l) => l.action === "effect.created" || l.action === "effect.duplicated");
  for (const effect of rows) {
    const named = made.filter((l) => l.summary === `created the effect ${effect.name}` || l.summary.endsWith(` as ${effect.name}`));
    const renamedTo = lines.filter((l) => l.action === "effect.renamed" && l.summary.endsWith(` to ${effect.name}`));
    expect(named.length + renamedTo.length, `effect “${effect.name}” has no line of its own`).toBeGreaterThan(0);
  }
  // No line without its row: as many creations and duplications as effects.
  expect(made.length).toBe(rows.length);
  // Every rename and every document save bumped the version exactly once, in the transaction that wrote its line.
  const renames = lines.filter((l) => l.action === "effect.renamed").length;
  const saves = lines.filter((l) => l.action === "effect.saved").length;
  expect(rows.reduce((n, e) => n + e.version - 1, 0)).toBe(renames + saves);
  // The bench's effect holds a document some save sent from an older version (or the one it was made with).
  const bench = rows.find((e) => e.id === world.effect.id)!;
  const width = (bench.document as { canvas?: { width?: number } }).canvas?.width;
  const possible = new Set([initialWidth]);
  for (const [version, widths] of sentWidths) if (version < bench.version) for (const w of widths) possible.add(w);
  expect(possible.has(width), `the document's canvas width ${width} was never sent`).toBe(true);
  // Every sprite is a whole PNG with its line, and no line lacks its sprite.
  const spriteRows = await db.select().from(sprites).where(eq(sprites.projectId, projectId));
  const added = lines.filter((l) => l.action === "sprite.added");
  expect(added.length, "sprite lines").toBe(spriteRows.length);
  for (const sprite of spriteRows) {
    const image = decodePng(new Uint8Array(sprite.png));
    expect([image.width, image.height], sprite.name).toEqual([sprite.width, sprite.height]);
    expect(sprite.byteSize, sprite.name).toBe(sprite.png.length);
    expect(
      added.some((l) => l.summary.startsWith(`added the sprite ${sprite.name} `)),
      `${sprite.name} has its line`,
    ).toBe(true);
  }
  // Project details: the version counts the saves of details, one line each.
  const [project] = await db.select().from(projects).where(eq(projects.id, projectId));
  const described = lines.filter((l) => l.action === "project.renamed" || l.action === "project.described").length;
  expect(project.version - 1).toBe(described);
}

/** The index in SAVES of the effect creation, whose acknowledged names are checked after each kill. */
const CREATE = 2;
const SAVES: ((c: Client, w: World, k: number, effects: { id: string; version: number }[]) => Promise<Response>)[] = [
  // The bench's document save, from the version last seen (a stale one is a 409, which saves nothing).
  async (c, w, k) => {
    const [e] = await db.select({ version: effects.version }).from(effects).where(eq(effects.id, w.effect.id));
    sentWidths.set(e.version, (sentWidths.get(e.version) ?? new Set()).add(32 + (k % 64)));
    return c.post(`/effects/${w.effect.id}`, {
      intent: "save",
      version: String(e.version),
      canvasWidth: String(32 + (k % 64)),
      canvasHeight: "48",
      pivotX: "16",
      pivotY: "24",
      angleMode: "list",
      angleList: `0\n${k % 360}\n90`,
      spriteId: w.sprite.id,
    });
  },
  // A sprite upload (multipart, as the page's file input sends it).
  (c, w, k) => {
    const form = new FormData();
    form.set("intent", "upload-sprite");
    form.set("name", `Crash sprite ${k}`);
    form.set("file", new Blob([new Uint8Array(w.sprite.png)], { type: "image/png" }), `crash-${k}.png`);
    return c.fetch(`/projects/${w.project.id}/sprites`, { method: "POST", body: form });
  },
  (c, w, k) => c.post(`/projects/${w.project.id}.data`, { intent: "create-effect", name: `Crash ${k}` }),
  (c, w) => c.post(`/projects/${w.project.id}.data`, { intent: "duplicate-effect", effectId: w.effect.id }),
  (c, w, k, list) => {
    const e = list[k % list.length];
    return c.post(`/projects/${w.project.id}.data`, {
      intent: "rename-effect",
      effectId: e.id,
      name: `Renamed ${k}`,
      version: String(e.version),
    });
  },
  async (c, w, k) => {
    const [p] = await db.select().from(projects).where(eq(projects.id, w.project.id));
    return c.post(`/projects/${w.project.id}.data`, {
      intent: "update-project",
      name: p.name,
      description: `Save ${k}`,
      version: String(p.version),
    });
  },
  // Exports in flight too.
  (c, w) => c.fetch(`/effects/${w.effect.id}/document.json`),
  (c, w) => c.fetch(`/effects/${w.effect.id}/export.zip`),
  (c, w) => c.fetch(`/projects/${w.project.id}`),
];

describe("the server killed in the middle of saves and exports", () => {
  it("keeps every save whole or absent, keeps every acknowledged save, and serves again after a restart", async () => {
    let acknowledged = 0;
    const byKind = SAVES.map(() => 0);
    let cut = 0;
    for (let round = 0; round < 3; round++) {
      const app = await serve();
      const owner = at(app, world.as.owner);
      const list = await db
        .select({ id: effects.id, version: effects.version })
        .from(effects)
        .where(eq(effects.projectId, world.project.id));
      const created: string[] = [];
      // Kill it partway through the burst: once a few saves of this round were answered, while others are in flight.
      let answered = 0;
      let wake!: () => void;
      const enoughAnswered = new Promise<void>((r) => (wake = r));
      const inFlight = Array.from({ length: 80 }, async (_, i) => {
        const k = round * 1000 + i;
        await new Promise((r) => setTimeout(r, i * 6));
        try {
          const response = await SAVES[i % SAVES.length](owner, world, k, list);
          await response.arrayBuffer();
          if (response.status === 200) {
            acknowledged += 1;
            byKind[i % SAVES.length] += 1;
            if (i % SAVES.length === CREATE) created.push(`Crash ${k}`);
          }
          if (++answered >= 4 + round * 6) wake();
        } catch {
          cut += 1; // the connection died with the server
        }
      });
      await Promise.race([enoughAnswered, new Promise((r) => setTimeout(r, 10_000))]);
      await app.kill();
      await Promise.all(inFlight);

      await checkWhole(world.project.id);
      for (const name of created) {
        const [row] = await db
          .select()
          .from(effects)
          .where(and(eq(effects.projectId, world.project.id), eq(effects.name, name)));
        expect(row, `“${name}” was acknowledged but is gone`).toBeDefined();
      }
    }
    console.log(
      `crash: 3 kills with 80 requests in flight each; ${acknowledged} saves or exports answered 200 before a kill, ${cut} cut off; 200s by kind ${byKind.join("/")}`,
    );
    expect(cut, "no request was cut by the kills: the test did not kill mid-flight").toBeGreaterThan(0);
    expect(acknowledged, "no save finished before a kill").toBeGreaterThan(0);

    const again = await serve();
    try {
      const owner = at(again, world.as.owner);
      expect((await fetch(`${again.url}/healthz`)).status).toBe(200);
      const page = await owner.fetch(`/projects/${world.project.id}`);
      expect(page.status).toBe(200);
      const download = await owner.fetch(`/effects/${world.effect.id}/document.json`);
      expect(((await download.json()) as { format: string }).format).toBe("skewsmith.effect/1");
      // And it saves again.
      expect((await owner.post(`/projects/${world.project.id}`, { intent: "create-effect", name: "After the crashes" })).status).toBe(200);
      // The bench's save and a sprite upload, as the mix sends them, go through too.
      expect((await SAVES[0](owner, world, 7, [])).status, "bench save").toBe(200);
      expect((await SAVES[1](owner, world, 7, [])).status, "sprite upload").toBe(200);
      await checkWhole(world.project.id);
    } finally {
      await again.stop();
    }
  });
});

describe("PostgreSQL stopped under the running app", () => {
  it("answers 503 with a clear message while it is down, saves nothing, and serves again once it is back", async () => {
    const app = await serve();
    try {
      const owner = at(app, world.as.owner);
      expect((await owner.fetch(`/projects/${world.project.id}`)).status).toBe(200);
      await cluster.stop();

      const page = await owner.fetch(`/projects/${world.project.id}`);
      expect(page.status).toBe(503);
      expect(page.headers.get("Retry-After")).toBe("5");
      const html = await page.text();
      expect(html).toContain("Skewsmith cannot reach its database");
      expect(errorMessageOf(html)).toBe(
        "The database is not reachable right now, so nothing was read or saved. Try again in a few seconds.",
      );
      expect(html).toContain(page.headers.get("X-Request-Id")!);
      expect((await owner.fetch(`/projects/${world.project.id}.data`)).status).toBe(503);
      expect((await fetch(`${app.url}/healthz`)).status).toBe(503);
      const file = await owner.fetch(`/effects/${world.effect.id}/document.json`);
      expect(file.status).toBe(503);
      expect(((await file.json()) as { error: { message: string } }).error.message).toMatch(/database is not reachable/);
      const save = await owner.post(`/projects/${world.project.id}`, { intent: "create-effect", name: "Saved while down" });
      expect(save.status).toBe(503);
      // Static files do not need the database.
      expect((await fetch(`${app.url}/favicon.svg`)).status).toBe(200);
      const logged = app.lines.find((l) => l.msg === "database unreachable" && l.requestId === page.headers.get("X-Request-Id"));
      expect(logged).toBeDefined();

      await cluster.start();
      // The same process, not restarted: the pool reconnects on the next request.
      await expect
        .poll(async () => (await owner.fetch(`/projects/${world.project.id}`)).status, { timeout: 20_000, interval: 250 })
        .toBe(200);
      expect(app.child.exitCode).toBeNull();
      const [row] = await db
        .select()
        .from(effects)
        .where(and(eq(effects.projectId, world.project.id), eq(effects.name, "Saved while down")));
      expect(row).toBeUndefined();
      expect((await owner.post(`/projects/${world.project.id}`, { intent: "create-effect", name: "Saved after" })).status).toBe(200);
      await checkWhole(world.project.id);
      expect((await db.execute(sql`select 1 as one`)).rows[0]).toEqual({ one: 1 });
    } finally {
      await app.stop();
    }
  });
});
