/**
 * Logs: every request is one JSON line (id, method, path without its query or secrets, status, duration, the
 * person once known), and an error shows its id to the person, in the page and in JSON, while the log has the
 * stack under the same id. A server and database of the test's own: it breaks its database on purpose.
 */
import { sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createDb, type Db } from "../../app/db/client.server.ts";
import { startFakeGitHub, type FakeGitHub } from "../../scripts/fakes/oauth.ts";
import { startApp, type AppProcess } from "../support/appServer.ts";
import { createScratchDatabase } from "../support/db.ts";
import { client, errorMessageOf } from "../support/http.ts";
import { makeWorld, type World } from "../support/world.ts";
import { messageOf } from "../support/fuzz.ts";

let scratch: Awaited<ReturnType<typeof createScratchDatabase>>;
let db: Db;
let github: FakeGitHub;
let app: AppProcess;
let world: World;

beforeAll(async () => {
  scratch = await createScratchDatabase("skewsmith_logs");
  db = createDb(scratch.url, { max: 2 });
  github = await startFakeGitHub({ clientId: "logs", clientSecret: "logs-secret" });
  app = await startApp({
    databaseUrl: scratch.url,
    env: { GITHUB_CLIENT_ID: "logs", GITHUB_CLIENT_SECRET: "logs-secret", GITHUB_OAUTH_URL: github.url, GITHUB_API_URL: github.apiUrl },
  });
  world = await makeWorld(db, app.url, github.url);
});
afterAll(async () => {
  await app?.stop();
  await github?.close();
  await db?.$client.end();
  await scratch?.drop();
});

const requestLines = () => app.lines.filter((l) => l.msg === "request");
const lineFor = (response: Response) =>
  app.waitForLine((l) => l.msg === "request" && l.requestId === response.headers.get("X-Request-Id"), 5_000);

describe("the request log", () => {
  it("writes one line per request, with id, method, path, status, duration and the person", async () => {
    const page = await world.as.owner.fetch(`/teams/${world.team.id}?sort=name&code=top-secret`);
    const anonymous = await client(app.url).fetch("/sign-in?next=%2Fx");
    const asset = await fetch(`${app.url}/favicon.svg`);
    const posted = await world.as.owner.post(`/projects/${world.project.id}`, { intent: "create-effect", name: "Logged beam" });
    for (const r of [page, anonymous, asset, posted]) expect(r.status).toBeLessThan(400);
    const [a, b, c, d] = await Promise.all([page, anonymous, asset, posted].map(lineFor));
    expect(a).toMatchObject({
      level: "info",
      method: "GET",
      path: `/teams/${world.team.id}`,
      status: 200,
      userId: world.owner.id,
      client: "127.0.0.1",
    });
    expect(typeof a.durationMs).toBe("number");
    expect(JSON.stringify(a)).not.toContain("top-secret");
    expect(b).toMatchObject({ method: "GET", path: "/sign-in", status: 200 });
    expect(b.userId).toBeUndefined();
    expect(c).toMatchObject({ method: "GET", path: "/favicon.svg", status: 200 });
    expect(d).toMatchObject({ method: "POST", path: `/projects/${world.project.id}`, status: 200, userId: world.owner.id });
    // One line each, nothing more.
    for (const r of [page, anonymous, asset, posted])
      expect(requestLines().filter((l) => l.requestId === r.headers.get("X-Request-Id"))).toHaveLength(1);
  });

  it("keeps secrets out of the path: an invitation's token is not logged", async () => {
    const response = await fetch(`${app.url}/invitations/s3cr3t-t0ken-value`);
    const line = await lineFor(response);
    expect(line.path).toBe("/invitations/…");
    expect(app.lines.some((l) => JSON.stringify(l).includes("s3cr3t-t0ken-value"))).toBe(false);
  });
});

describe("an unexpected error", () => {
  it("shows its id on the page and in JSON, and the log has the stack under that id", async () => {
    // Break the database under the running app: the project page reads the activity table, sprite files read sprites.
    await db.execute(sql`alter table activity rename to activity_gone`);
    await db.execute(sql`alter table sprites rename to sprites_gone`);
    try {
      const page = await world.as.owner.fetch(`/projects/${world.project.id}`);
      expect(page.status).toBe(500);
      const id = page.headers.get("X-Request-Id")!;
      const html = await page.text();
      expect(errorMessageOf(html)).toBe("Something went wrong on our side. It was logged; try again in a moment.");
      expect(html).toMatch(new RegExp(`data-testid="error-reference"[^>]*>Reference for a report: <span[^>]*>${id}</span>`));
      const logged = await app.waitForLine((l) => l.level === "error" && l.requestId === id);
      expect(logged).toMatchObject({ msg: "unhandled error", where: "routes/project loader" });
      // The query layer wraps PostgreSQL's error; the log keeps both, with the stack.
      const error = logged.error as { message: string; stack: string; cause: { message: string; code: string } };
      expect(error.message).toMatch(/^Failed query: select/);
      expect(error.cause).toMatchObject({
        message: expect.stringMatching(/^relation "(activity|sprites)" does not exist$/),
        code: "42P01",
      });
      expect(error.stack).toMatch(/\n\s+at /);
      expect((await lineFor(page)).status).toBe(500);

      // The app's own scripts get the id in the data; a file gets it in JSON.
      const data = await world.as.owner.fetch(`/projects/${world.project.id}.data`);
      expect(data.status).toBe(500);
      expect(await messageOf(data, "data")).toMatch(/^Something went wrong on our side/);
      const file = await world.as.owner.fetch(`/sprites/${world.sprite.id}/image.png`);
      expect(file.status).toBe(500);
      const body = (await file.json()) as { error: { requestId: string; message: string } };
      expect(body.error.requestId).toBe(file.headers.get("X-Request-Id"));
      expect((await app.waitForLine((l) => l.level === "error" && l.requestId === body.error.requestId)).where).toBe(
        "routes/sprite.image loader",
      );
      // Nothing of the error's details reaches the person.
      expect(html).not.toMatch(/activity_gone|does not exist|42P01/);
    } finally {
      await db.execute(sql`alter table activity_gone rename to activity`);
      await db.execute(sql`alter table sprites_gone rename to sprites`);
    }
    expect((await world.as.owner.fetch(`/projects/${world.project.id}`)).status).toBe(200);
  });
});
