/**
 * Load benchmark of the web app: the production build, served as the start command serves it, on 127.0.0.1,
 * driven by autocannon with signed-in clients.
 *
 * It makes a throwaway PostgreSQL cluster (.tmp/bench-pg), a fresh database with a realistic team (24 members,
 * 12 projects of 8 effects, target profiles, sprites, activity), a session for every member, starts the server and
 * runs, in order:
 *   floor        GET /healthz at 10 clients: the server stack and one trivial query, the same-run baseline
 *   page alone   one client, signed-in pages one after another: what a single page costs
 *   pages @10    10 clients, signed-in pages (home, team, project, effect)
 *   pages @20    20 clients, the same pages
 *   mix @100     100 clients for --duration seconds: pages, table computations and exports together
 * and prints requests per second, p50/p95/p99 latency, errors (socket errors, timeouts and non-2xx answers), the CPU
 * time per request of the server process and of PostgreSQL's backends for its database (the measure least moved by
 * other work on a shared machine), and the server's resident memory (RSS) before and after each scenario. Pages are the four signed-in pages; "tables" are
 * the effect route's data request (its loader compiles the shift tables with core); "exports" are effect document
 * downloads.
 *
 * TODO (when the JSON API under /api/v1 lands): replace the "tables" requests by the API's table computation
 * (GET /api/v1/effects/:id/tables with a bearer token), add the export bundle download (zip) and frame PNGs to
 * "exports", and add the bench's document saves (POST with the version) to the mix.
 *
 * --baseline <git ref> also serves that commit (extracted with git archive into .tmp/bench/, built there with this
 * checkout's node_modules, on a database of its own): every scenario is cut into 5-second rounds that alternate
 * between the two servers, so before and after are measured in the same run under the same machine load, and the
 * ratios are printed. --cpu-prof runs the server under `node --cpu-prof` and prints where a
 * render spends its time. A benchmark prints numbers, never verdicts: nothing here passes or fails.
 *
 * Run: node --import tsx bench/load.ts [--baseline REF] [--duration 30] [--clients 100] [--cpu-prof] [--only NAME,…]
 */
import { execFileSync, spawn, type ChildProcess } from "node:child_process";
import { randomBytes } from "node:crypto";
import { existsSync, mkdirSync, readdirSync, readFileSync, rmSync, symlinkSync } from "node:fs";
import { createServer } from "node:net";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { parseArgs } from "node:util";
import autocannon from "autocannon";
import { migrate } from "drizzle-orm/node-postgres/migrator";
import { compassRose } from "../app/demo/art.ts";
import { createDb, type Db } from "../app/db/client.server.ts";
import type { Project, TargetProfile, Team, User } from "../app/db/schema.ts";
import { createDbSessionStorage } from "../app/sessions.server.ts";
import { startCluster } from "../scripts/lib/cluster.ts";
import { makeEffect, makeProject, makeSprite, makeTargetProfile, makeTeam, makeUser } from "../tests/factories.ts";
import { printProfile } from "./cpuProfile.ts";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
const WORK = path.join(ROOT, ".tmp/bench");

const { values: args } = parseArgs({
  options: {
    baseline: { type: "string" },
    duration: { type: "string", default: "30" },
    clients: { type: "string", default: "100" },
    "cpu-prof": { type: "boolean", default: false },
    only: { type: "string" },
    "pg-port": { type: "string", default: "55431" },
  },
});
const DURATION = Number(args.duration);
const CLIENTS = Number(args.clients);
const ONLY = args.only ? new Set(args.only.split(",")) : null;
/** Length of one round when a baseline and this checkout take turns, in seconds. */
const ROUND_SECONDS = 5;

interface Target {
  label: string;
  dir: string;
}

interface World {
  cookies: string[];
  pages: string[];
  tables: string[];
  exports: string[];
}

interface Outcome {
  name: string;
  clients: number;
  seconds: number;
  requests: number;
  rps: number;
  p50: number;
  p95: number;
  p99: number;
  errors: number;
  /** CPU milliseconds per request: the server process, and PostgreSQL's backends for its database. */
  cpuServerPerRequest: number;
  cpuDatabasePerRequest: number;
  rssBefore: number;
  rssAfter: number;
}

function log(message: string): void {
  process.stderr.write(`[bench] ${message}\n`);
}

// ---------------------------------------------------------------------------------------------------------------
// The code under test: this checkout, or a baseline commit extracted and built beside it.

function prepareBaseline(ref: string): Target {
  const sha = execFileSync("git", ["rev-parse", "--short", ref], { cwd: ROOT, encoding: "utf8" }).trim();
  const dir = path.join(WORK, `baseline-${sha}`);
  if (!existsSync(path.join(dir, "package.json"))) {
    rmSync(dir, { recursive: true, force: true });
    mkdirSync(dir, { recursive: true });
    log(`extracting ${ref} (${sha}) into ${path.relative(ROOT, dir)}`);
    execFileSync("bash", ["-c", `git archive ${sha} | tar -x -C "${dir}"`], { cwd: ROOT });
    // This checkout's packages (the baseline's lockfile is assumed close enough); the core package is its own copy.
    symlinkSync(path.join(ROOT, "node_modules"), path.join(dir, "node_modules"));
    mkdirSync(path.join(dir, "packages/core/node_modules"), { recursive: true });
  }
  return { label: `baseline ${sha}`, dir };
}

function build(target: Target): void {
  log(`building ${target.label}`);
  execFileSync(path.join(ROOT, "node_modules/.bin/react-router"), ["build"], {
    cwd: target.dir,
    stdio: ["ignore", "ignore", "inherit"],
    env: { ...process.env, NODE_ENV: "production", SKEWSMITH_BUILD_DIR: "" },
  });
}

// ---------------------------------------------------------------------------------------------------------------
// Data: one busy team, shared by every bench member, plus a small team of each member's own.

const DOCUMENTS = [
  { canvas: { width: 32, height: 32 }, pivot: { x: 16, y: 16 }, angles: { sweep: { from: 0, to: 360, frames: 64 } } },
  {
    canvas: { width: 256, height: 224 },
    pivot: { x: 128, y: 112 },
    angles: { sweep: { from: -12, to: 12, frames: 48, easing: "ease-in-out", includeEnd: true } },
    columnGroup: 16,
  },
  { canvas: { width: 128, height: 128 }, pivot: { x: 64, y: 64 }, angles: { sweep: { from: 0, to: 360, frames: 256 } } },
];

async function seed(db: Db, secret: string): Promise<World> {
  const owner = await makeUser(db, { login: "bench-owner", githubId: 900_000_001 });
  const members: User[] = [owner];
  for (let i = 2; i <= 24; i++) members.push(await makeUser(db, { login: `bench-member-${i}`, githubId: 900_000_000 + i }));
  const team: Team = await makeTeam(db, {
    owner,
    name: "Bench Harbour",
    members: members.slice(1).map((user, i) => ({ user, role: i % 5 === 4 ? "viewer" : "editor" })),
  });
  const profiles: TargetProfile[] = [];
  for (const [i, size] of [
    [64, 64],
    [256, 224],
    [160, 144],
  ].entries())
    profiles.push(
      await makeTargetProfile(db, { team, actor: owner, name: `Bench profile ${i + 1}`, canvasWidth: size[0], canvasHeight: size[1] }),
    );
  const projects: Project[] = [];
  const effects: string[] = [];
  for (let p = 0; p < 12; p++) {
    const project = await makeProject(db, {
      team,
      actor: members[p % members.length],
      name: `Bench project ${p + 1}`,
      description: "A level.",
    });
    projects.push(project);
    const sprite = await makeSprite(db, { project, actor: owner, image: compassRose(32) });
    for (let e = 0; e < 8; e++) {
      const effect = await makeEffect(db, {
        project,
        actor: members[(p + e) % members.length],
        name: `Effect ${p + 1}.${e + 1}`,
        document: DOCUMENTS[e % DOCUMENTS.length],
        sprite: e % 2 === 0 ? sprite : undefined,
        targetProfile: e % 3 === 0 ? undefined : profiles[e % profiles.length],
      });
      effects.push(effect.id);
    }
  }
  for (const m of members) {
    const own = await makeTeam(db, { owner: m, name: `${m.login} studio` });
    const project = await makeProject(db, { team: own, actor: m, name: "Scratch" });
    await makeEffect(db, { project, actor: m, name: "Try-out" });
  }
  const storage = createDbSessionStorage(db, { secrets: [secret], secure: false });
  const cookies: string[] = [];
  for (const m of members) {
    const session = await storage.getSession();
    session.set("userId", m.id);
    cookies.push((await storage.commitSession(session)).split(";")[0]);
  }
  return {
    cookies,
    pages: [
      "/",
      `/teams/${team.id}`,
      ...projects.map((p) => `/projects/${p.id}`),
      ...effects.filter((_, i) => i % 4 === 0).map((id) => `/effects/${id}`),
    ],
    tables: effects.map((id) => `/effects/${id}.data`),
    exports: effects.map((id) => `/effects/${id}/document.json`),
  };
}

// ---------------------------------------------------------------------------------------------------------------
// The server.

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = createServer();
    server.once("error", reject);
    server.listen(0, "127.0.0.1", () => {
      const { port } = server.address() as { port: number };
      server.close(() => resolve(port));
    });
  });
}

interface Running {
  url: string;
  /** The database it serves (to find its PostgreSQL backends). */
  database: string;
  child: ChildProcess;
  rss(): number;
  stop(): Promise<void>;
}

async function startServer(target: Target, databaseUrl: string, secret: string, profileDir?: string): Promise<Running> {
  // The server of the code under test: its own server.js when it has one, else the framework's react-router-serve.
  const own = existsSync(path.join(target.dir, "server.js"));
  for (let attempt = 0; ; attempt++) {
    const port = await freePort();
    const url = `http://127.0.0.1:${port}`;
    const nodeArgs = profileDir ? ["--cpu-prof", `--cpu-prof-dir=${profileDir}`] : [];
    const entry = own ? ["server.js"] : [path.join(ROOT, "node_modules/@react-router/serve/bin.js"), "build/server/index.js"];
    const child = spawn(process.execPath, [...nodeArgs, ...entry], {
      cwd: target.dir,
      env: {
        ...process.env,
        NODE_ENV: "production",
        HOST: "127.0.0.1",
        PORT: String(port),
        DATABASE_URL: databaseUrl,
        APP_URL: url,
        SESSION_SECRET: secret,
        GITHUB_CLIENT_ID: "bench",
        GITHUB_CLIENT_SECRET: "bench-secret",
        GITHUB_OAUTH_URL: "http://127.0.0.1:9",
        GITHUB_API_URL: "http://127.0.0.1:9/api",
        SKEWSMITH_BUILD_DIR: "",
        // The request log is part of what a production server does, so it stays on; it goes nowhere here.
      },
      stdio: ["ignore", "ignore", "pipe"],
    });
    let stderr = "";
    child.stderr!.on("data", (c: Buffer) => (stderr = (stderr + c.toString()).slice(-4000)));
    const deadline = Date.now() + 30_000;
    let up = false;
    while (Date.now() < deadline && child.exitCode === null) {
      up = await fetch(`${url}/healthz`).then(
        (r) => r.ok,
        () => false,
      );
      if (up) break;
      await new Promise((r) => setTimeout(r, 200));
    }
    if (!up) {
      child.kill("SIGKILL");
      if (attempt < 3 && /EADDRINUSE/.test(stderr)) continue;
      throw new Error(`the server did not come up:\n${stderr}`);
    }
    return {
      url,
      database: new URL(databaseUrl).pathname.slice(1),
      child,
      rss() {
        const status = readFileSync(`/proc/${child.pid}/status`, "utf8");
        return Number(/VmRSS:\s+(\d+)/.exec(status)?.[1] ?? 0) / 1024;
      },
      async stop() {
        const exited = new Promise((r) => child.once("exit", r));
        child.kill("SIGTERM");
        const timer = setTimeout(() => child.kill("SIGKILL"), 15_000);
        await exited;
        clearTimeout(timer);
      },
    };
  }
}

// ---------------------------------------------------------------------------------------------------------------
// Scenarios.

function percentile(sorted: number[], p: number): number {
  if (sorted.length === 0) return NaN;
  return sorted[Math.min(sorted.length - 1, Math.floor((p / 100) * sorted.length))];
}

/** CPU time (user + system) a process has used so far, in milliseconds (Linux /proc; clock ticks of 10 ms). */
function cpuMs(pid: number): number {
  try {
    const stat = readFileSync(`/proc/${pid}/stat`, "utf8");
    const fields = stat.slice(stat.lastIndexOf(")") + 2).split(" ");
    return (Number(fields[11]) + Number(fields[12])) * 10;
  } catch {
    return 0;
  }
}

/** CPU used so far by the PostgreSQL backends serving database `name` (their process titles name it). */
function databaseCpuMs(name: string): number {
  let total = 0;
  for (const entry of readdirSync("/proc")) {
    if (!/^\d+$/.test(entry)) continue;
    let title: string;
    try {
      title = readFileSync(`/proc/${entry}/cmdline`, "utf8");
    } catch {
      continue;
    }
    if (title.startsWith("postgres: ") && title.split(" ")[2] === name) total += cpuMs(Number(entry));
  }
  return total;
}

interface Raw {
  /** CPU milliseconds the server process and its database's backends used. */
  cpuServer: number;
  cpuDatabase: number;
  latencies: number[];
  requests: number;
  seconds: number;
  errors: number;
  rssBefore: number;
  rssAfter: number;
}

async function run(
  server: Running,
  world: World,
  options: { clients: number; seconds: number; paths: () => string; signedIn?: boolean },
): Promise<Raw> {
  const latencies: number[] = [];
  const rssBefore = server.rss();
  const cpuBefore = [cpuMs(server.child.pid!), databaseCpuMs(server.database)];
  let next = 0;
  const result = await autocannon({
    url: server.url,
    connections: options.clients,
    duration: options.seconds,
    timeout: 10,
    requests: [{ method: "GET", setupRequest: (req) => ({ ...req, path: options.paths() }) }],
    setupClient(client) {
      if (options.signedIn !== false) client.setHeaders({ cookie: world.cookies[next++ % world.cookies.length] });
      client.on("response", (_status: number, _bytes: number, responseTime: number) => latencies.push(responseTime));
    },
  });
  return {
    cpuServer: cpuMs(server.child.pid!) - cpuBefore[0],
    cpuDatabase: databaseCpuMs(server.database) - cpuBefore[1],
    latencies,
    requests: result.requests.total,
    seconds: options.seconds,
    errors: result.errors + result.timeouts + result.non2xx,
    rssBefore,
    rssAfter: server.rss(),
  };
}

function outcome(name: string, clients: number, parts: Raw[]): Outcome {
  const latencies = parts.flatMap((p) => p.latencies).sort((a, b) => a - b);
  const requests = parts.reduce((n, p) => n + p.requests, 0);
  const seconds = parts.reduce((n, p) => n + p.seconds, 0);
  return {
    name,
    clients,
    seconds,
    requests,
    rps: requests / seconds,
    p50: percentile(latencies, 50),
    p95: percentile(latencies, 95),
    p99: percentile(latencies, 99),
    errors: parts.reduce((n, p) => n + p.errors, 0),
    cpuServerPerRequest: parts.reduce((n, p) => n + p.cpuServer, 0) / Math.max(1, requests),
    cpuDatabasePerRequest: parts.reduce((n, p) => n + p.cpuDatabase, 0) / Math.max(1, requests),
    rssBefore: parts[0].rssBefore,
    rssAfter: parts.at(-1)!.rssAfter,
  };
}

async function drive(server: Running, world: World, name: string, options: Parameters<typeof run>[2]): Promise<Outcome> {
  return outcome(name, options.clients, [await run(server, world, options)]);
}

const pick = (list: string[]) => () => list[Math.floor(Math.random() * list.length)];

/** The scenarios, in order. */
function scenarios(world: World): [string, Parameters<typeof drive>[3]][] {
  const pages = pick(world.pages);
  const mix = () => {
    const r = Math.random();
    return r < 0.5 ? pages() : r < 0.8 ? pick(world.tables)() : pick(world.exports)();
  };
  return [
    ["floor", { clients: 10, seconds: 10, paths: () => "/healthz", signedIn: false }],
    ["page alone", { clients: 1, seconds: 10, paths: pages }],
    ["pages @10", { clients: 10, seconds: 20, paths: pages }],
    ["pages @20", { clients: 20, seconds: 20, paths: pages }],
    [`mix @${CLIENTS}`, { clients: CLIENTS, seconds: DURATION, paths: mix }],
  ];
}

function print(label: string, outcomes: Outcome[]): void {
  console.log(`\n${label}`);
  console.log(
    `  ${"scenario".padEnd(12)} ${"clients".padStart(7)} ${"req/s".padStart(8)} ${"p50 ms".padStart(8)} ${"p95 ms".padStart(8)} ${"p99 ms".padStart(8)} ${"errors".padStart(7)} ${"CPU ms/req: server".padStart(19)} ${"db".padStart(5)}   RSS MB before → after`,
  );
  for (const o of outcomes)
    console.log(
      `  ${o.name.padEnd(12)} ${String(o.clients).padStart(7)} ${o.rps.toFixed(1).padStart(8)} ${o.p50.toFixed(1).padStart(8)} ${o.p95.toFixed(1).padStart(8)} ${o.p99.toFixed(1).padStart(8)} ${String(o.errors).padStart(7)} ${o.cpuServerPerRequest.toFixed(2).padStart(19)} ${o.cpuDatabasePerRequest.toFixed(2).padStart(5)}   ${o.rssBefore.toFixed(0)} → ${o.rssAfter.toFixed(0)}`,
    );
  const floor = outcomes.find((o) => o.name === "floor");
  if (floor)
    for (const o of outcomes.filter((x) => x.name.startsWith("pages")))
      console.log(`  ${o.name}: ${(o.rps / floor.rps).toFixed(3)} of the floor's requests per second`);
}

async function main(): Promise<void> {
  mkdirSync(WORK, { recursive: true });
  const cluster = await startCluster({ dir: path.join(ROOT, ".tmp/bench-pg"), port: Number(args["pg-port"]) });
  const targets: Target[] = [];
  if (args.baseline) targets.push(prepareBaseline(args.baseline));
  targets.push({ label: "this checkout", dir: ROOT });
  const running: { target: Target; server: Running; world: World; outcomes: Outcome[]; profileDir?: string }[] = [];
  try {
    for (const [i, target] of targets.entries()) {
      build(target);
      const databaseUrl = await cluster.createDatabase(`bench_${i}`);
      const db = createDb(databaseUrl, { max: 4 });
      const secret = randomBytes(32).toString("hex");
      let world: World;
      try {
        await migrate(db, { migrationsFolder: path.join(target.dir, "drizzle") });
        log(`seeding ${target.label}`);
        world = await seed(db, secret);
      } finally {
        await db.$client.end();
      }
      const profileDir = args["cpu-prof"] ? path.join(WORK, `prof-${i}-${Date.now()}`) : undefined;
      running.push({ target, server: await startServer(target, databaseUrl, secret, profileDir), world, outcomes: [], profileDir });
    }
    // Both servers are up, idle but one; each scenario runs on every server in turn, so before and after meet the
    // same machine load (other work on the machine comes and goes).
    for (const r of running) {
      log(`warming up ${r.target.label} (5 s)`);
      await drive(r.server, r.world, "warm-up", { clients: 10, seconds: 5, paths: scenarios(r.world)[4][1].paths });
    }
    // With a baseline, each scenario is cut into rounds of ROUND_SECONDS that alternate between the servers, so a
    // burst of other work on the machine falls on both alike; alone, a scenario runs in one go.
    for (let s = 0; s < scenarios(running[0].world).length; s++) {
      const [name, first] = scenarios(running[0].world)[s];
      if (ONLY && !ONLY.has(name.split(" ")[0])) continue;
      const rounds = running.length > 1 ? Math.max(1, Math.round(first.seconds / ROUND_SECONDS)) : 1;
      const parts = running.map((): Raw[] => []);
      for (let round = 0; round < rounds; round++)
        for (const [i, r] of round % 2 ? [...running.entries()].reverse() : [...running.entries()]) {
          const [, options] = scenarios(r.world)[s];
          log(`${r.target.label}, ${name}: ${options.clients} client(s), round ${round + 1} of ${rounds}`);
          parts[i].push(await run(r.server, r.world, { ...options, seconds: options.seconds / rounds }));
        }
      for (const [i, r] of running.entries()) r.outcomes.push(outcome(name, first.clients, parts[i]));
    }
  } finally {
    for (const r of running) await r.server.stop();
    await cluster.stop();
  }
  for (const r of running)
    if (r.profileDir)
      for (const file of readdirSync(r.profileDir).filter((f) => f.endsWith(".cpuprofile"))) printProfile(path.join(r.profileDir, file));
  console.log(
    `\nMachine: ${(await import("node:os")).cpus().length} cores, Node ${process.version}, load average ${(await import("node:os"))
      .loadavg()
      .map((l) => l.toFixed(1))
      .join(" ")}`,
  );
  for (const r of running) print(r.target.label, r.outcomes);
  if (running.length === 2) {
    const [before, after] = running.map((r) => new Map(r.outcomes.map((o) => [o.name, o])));
    console.log(
      `\nthis checkout against ${running[0].target.label} (after / before; CPU per request is the measure least moved by other work on the machine):`,
    );
    for (const [name, a] of after) {
      const b = before.get(name);
      if (b)
        console.log(
          `  ${name.padEnd(12)} throughput ×${(a.rps / b.rps).toFixed(2)}   p95 ×${(a.p95 / b.p95).toFixed(2)}   ` +
            `CPU per request (server + database) ×${((a.cpuServerPerRequest + a.cpuDatabasePerRequest) / (b.cpuServerPerRequest + b.cpuDatabasePerRequest)).toFixed(2)}`,
        );
    }
  }
}

await main();
