/**
 * Crash and restart, on a PostgreSQL cluster and a server of this test's own (nothing else is disturbed):
 *
 *   - the server is killed (SIGKILL, no chance to clean up) while saves and exports are in flight, several times;
 *     after a restart every save is there whole or not at all, every save that was answered 200 is there, and the
 *     app serves again, with the sessions it had;
 *   - PostgreSQL stops under the running app: pages answer 503 with a clear message and a reference, saves are
 *     refused and nothing is half-written; when PostgreSQL is back, the same app process serves again.
 *
 * Save kinds in the mix (phase 2 adds the effect bench's document save and sprite uploads to SAVES).
 */
import { rmSync } from "node:fs";
import path from "node:path";
import { and, eq, sql } from "drizzle-orm";
import { migrate } from "drizzle-orm/node-postgres/migrator";
import { randomBytes } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createDb, type Db } from "../../app/db/client.server.ts";
import { activity, effects, projects } from "../../app/db/schema.ts";
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
  await first.stop();
});

afterAll(async () => {
  await github?.close();
  await db?.$client.end();
  await cluster?.stop();
  rmSync(clusterDir, { recursive: true, force: true });
});

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
  // Every rename bumped the version exactly once, in the transaction that wrote its line.
  const renames = lines.filter((l) => l.action === "effect.renamed").length;
  expect(rows.reduce((n, e) => n + e.version - 1, 0)).toBe(renames);
  // Project details: the version counts the saves of details, one line each.
  const [project] = await db.select().from(projects).where(eq(projects.id, projectId));
  const described = lines.filter((l) => l.action === "project.renamed" || l.action === "project.described").length;
  expect(project.version - 1).toBe(described);
}

const SAVES: ((c: Client, w: World, k: number, effects: { id: string; version: number }[]) => Promise<Response>)[] = [
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
  (c, w) => c.fetch(`/projects/${w.project.id}`),
];

describe("the server killed in the middle of saves and exports", () => {
  it("keeps every save whole or absent, keeps every acknowledged save, and serves again after a restart", async () => {
    let acknowledged = 0;
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
            if (i % SAVES.length === 0) created.push(`Crash ${k}`);
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
      `crash: 3 kills with 80 requests in flight each; ${acknowledged} saves or exports answered 200 before a kill, ${cut} cut off`,
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
