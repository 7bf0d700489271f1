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
 * other work on a shared machine), and the server's resident memory (RSS) before and after each scenario. Pages are
 * the four signed-in pages (home, team, project, effect bench). The mix is, per request:
 *   45% pages                  as above, with the session cookie
 *   20% tables                 POST /api/v1/tables with an effect document, a bearer token (what a build does)
 *   10% export bundles         GET /api/v1/effects/:id/export.zip with a bearer token
 *   10% frame PNGs             GET /effects/:id/frames/N.png?pass=P of effects with a sprite, with the cookie
 *    5% effect documents       GET /effects/:id/document.json
 *   10% document saves         PUT /api/v1/effects/:id from the version last answered: each save effect is leased
 *                              to one request at a time, so a 409 here is an error, not a race the mix made
 * and prints how many of each were sent and how many failed. The API's per-token rate limit is raised for the run
 * (RATE_LIMIT_API): this measures the work behind the limiter, which at its default would answer most of 100
 * clients with 429.
 *
 * --baseline <git ref> also serves that commit (extracted with git archive into .tmp/bench/, built there with this
 * checkout's node_modules, on a database of its own migrated and seeded by this checkout): every scenario is cut into 5-second rounds that alternate
 * between the two servers, so before and after are measured in the same run under the same machine load, and the
 * ratios are printed. --cpu-prof runs the server under `node --cpu-prof` and prints where a
 * render spends its time. A benchmark prints numbers, never verdicts: nothing here passes or fails.
 *
 * --scale F multiplies every scenario's length (0.5 for a quick look while iterating; a figure to record is measured
 * at 1); --round-seconds N sets the rounds' length (5 by default). A baseline commit is built once and reused by
 * later runs (its code does not change).
 *
 * --save-pages writes one page of each route, as each server answers it, into .tmp/bench/pages/ (to see what a page
 * sends).
 *
 * Run: node --import tsx bench/load.ts [--baseline REF] [--duration 30] [--clients 100] [--cpu-prof] [--only NAME,…]
 *      [--save-pages] [--pg-port PORT] [--scale F] [--round-seconds N]
 */
import { execFileSync, spawn, type ChildProcess } from "node:child_process";
import { randomBytes } from "node:crypto";
import { existsSync, mkdirSync, readdirSync, readFileSync, rmSync, symlinkSync, writeFileSync } from "node:fs";
import { createServer } from "node:net";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { parseArgs } from "node:util";
import autocannon from "autocannon";
import { migrate } from "drizzle-orm/node-postgres/migrator";
import { compassRose } from "../app/demo/art.ts";
import { createDb, type Db } from "../app/db/client.server.ts";
import type { Project, TargetProfile, Team, User } from "../app/db/schema.ts";
import { createApiToken } from "../app/models/apiTokens.server.ts";
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
    "save-pages": { type: "boolean", default: false },
    "pg-port": { type: "string", default: "55431" },
    scale: { type: "string", default: "1" },
    "round-seconds": { type: "string", default: "5" },
  },
});
const DURATION = Number(args.duration);
const CLIENTS = Number(args.clients);
const ONLY = args.only ? new Set(args.only.split(",")) : null;
/** Every scenario's length is multiplied by this (--scale 0.5: half as long, for quick looks while iterating). */
const SCALE = Number(args.scale);
/** Length of one round when a baseline and this checkout take turns, in seconds. */
const ROUND_SECONDS = Number(args["round-seconds"]);
if (!(SCALE > 0 && SCALE <= 10)) throw new Error(`--scale must be a number above 0 and at most 10, not "${args.scale}"`);
if (!(ROUND_SECONDS >= 1 && ROUND_SECONDS <= 60))
  throw new Error(`--round-seconds must be a number from 1 to 60, not "${args["round-seconds"]}"`);

interface Target {
  label: string;
  dir: string;
  /** A baseline commit: its code never changes, so one build of it serves every later run. */
  fixed?: boolean;
}

interface World {
  cookies: string[];
  /** Bearer tokens of editors (write scope), for the API. */
  tokens: string[];
  pages: string[];
  tables: string[];
  bundles: string[];
  frames: string[];
  documents: string[];
  /** Effects only the mix's saves write to, with the version each is at. */
  saves: { id: string; version: number; busy: boolean }[];
}

/** One request of a scenario; `done` sees its answer. */
interface Req {
  kind: string;
  method?: "GET" | "POST" | "PUT";
  path: string;
  /** Sent instead of the client's cookie when present (the API's bearer calls carry no cookie). */
  headers?: Record<string, string>;
  body?: string;
  done?: (status: number, body: string) => void;
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
  /** Requests sent and failed (not 2xx) by kind. */
  kinds: Map<string, { sent: number; failed: number }>;
  /** Answers and their bytes (the body as sent, without compression) by the route a path belongs to. */
  sizes: Map<string, { answers: number; bytes: number }>;
}

/** The route of a path, for sizes: its first segment, or "home". */
function routeOf(path: string): string {
  return path.split("/")[1]?.split("?")[0] || "home";
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
  return { label: `baseline ${sha}`, dir, fixed: true };
}

function build(target: Target): void {
  const done = path.join(target.dir, "build/.bench-built");
  if (target.fixed && existsSync(done)) return log(`${target.label}: built by an earlier run`);
  log(`building ${target.label}`);
  execFileSync(path.join(ROOT, "node_modules/.bin/react-router"), ["build"], {
    cwd: target.dir,
    stdio: ["ignore", "ignore", "inherit"],
    env: { ...process.env, NODE_ENV: "production", SKEWSMITH_BUILD_DIR: "" },
  });
  if (target.fixed) writeFileSync(done, "");
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
  const withSprite: string[] = [];
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
      if (e % 2 === 0) withSprite.push(effect.id);
    }
  }
  // Effects only the saves of the mix write to, each leased to one request at a time.
  const saveProject = await makeProject(db, { team, actor: owner, name: "Bench saves" });
  const saves: World["saves"] = [];
  for (let k = 0; k < 24; k++) {
    const effect = await makeEffect(db, { project: saveProject, actor: owner, name: `Saved ${k + 1}`, document: DOCUMENTS[0] });
    saves.push({ id: effect.id, version: effect.version, busy: false });
  }
  const tokens: string[] = [];
  for (const [i, m] of members.entries())
    if (i === 0 || i % 5 !== 0)
      tokens.push((await createApiToken(db, { userId: m.id, name: "Bench build", scope: "write", expiresAt: null })).token);
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
    tokens,
    tables: DOCUMENTS.map((d) => JSON.stringify(d)),
    bundles: effects.map((id) => `/api/v1/effects/${id}/export.zip`),
    frames: withSprite.flatMap((id) => [0, 5, 17].map((n) => `/effects/${id}/frames/${n}.png?pass=${n % 4}`)),
    documents: effects.map((id) => `/effects/${id}/document.json`),
    saves,
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
        RATE_LIMIT_API: "1000000/60",
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

/** CPU used so far by each PostgreSQL backend serving database `name` (their process titles name it), by pid. */
function databaseCpuByPid(name: string): Map<number, number> {
  const byPid = new Map<number, number>();
  for (const entry of readdirSync("/proc")) {
    if (!/^\d+$/.test(entry)) continue;
    let title: string;
    try {
      title = readFileSync(`/proc/${entry}/cmdline`, "utf8");
    } catch {
      continue;
    }
    if (title.startsWith("postgres: ") && title.split(" ")[2] === name) byPid.set(Number(entry), cpuMs(Number(entry)));
  }
  return byPid;
}

/**
 * The CPU a database's backends use from now until `stop()`: looked at every half second, so a backend that exits
 * in between (the pool closes idle connections) keeps what it used up to its last look instead of dropping out of
 * the sum (which made the figure too low, even negative).
 */
function databaseCpuMeter(name: string): { stop(): number } {
  const first = databaseCpuByPid(name);
  const last = new Map(first);
  const look = () => {
    for (const [pid, ms] of databaseCpuByPid(name)) {
      if (!first.has(pid)) first.set(pid, 0);
      last.set(pid, ms);
    }
  };
  const timer = setInterval(look, 500);
  return {
    stop() {
      clearInterval(timer);
      look();
      let total = 0;
      for (const [pid, ms] of last) total += ms - first.get(pid)!;
      return total;
    },
  };
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
  kinds: Map<string, { sent: number; failed: number }>;
  sizes: Map<string, { answers: number; bytes: number }>;
}

async function run(
  server: Running,
  world: World,
  options: { clients: number; seconds: number; next: () => Req; signedIn?: boolean },
): Promise<Raw> {
  const latencies: number[] = [];
  const kinds = new Map<string, { sent: number; failed: number }>();
  const sizes = new Map<string, { answers: number; bytes: number }>();
  const rssBefore = server.rss();
  const cpuBefore = cpuMs(server.child.pid!);
  const database = databaseCpuMeter(server.database);
  let next = 0;
  const result = await autocannon({
    url: server.url,
    connections: options.clients,
    duration: options.seconds,
    timeout: 10,
    requests: [
      {
        method: "GET",
        setupRequest(req, context) {
          const r = options.next();
          (context as { req?: Req }).req = r;
          const k = kinds.get(r.kind) ?? { sent: 0, failed: 0 };
          kinds.set(r.kind, { ...k, sent: k.sent + 1 });
          return { ...req, method: r.method ?? "GET", path: r.path, headers: r.headers ?? req.headers, body: r.body ?? "" };
        },
        onResponse(status, body, context) {
          const r = (context as { req?: Req }).req;
          if (!r) return;
          if (status < 200 || status > 299) kinds.get(r.kind)!.failed += 1;
          const size = sizes.get(routeOf(r.path)) ?? { answers: 0, bytes: 0 };
          sizes.set(routeOf(r.path), { answers: size.answers + 1, bytes: size.bytes + Buffer.byteLength(body) });
          r.done?.(status, body);
        },
      },
    ],
    setupClient(client) {
      if (options.signedIn !== false) client.setHeaders({ cookie: world.cookies[next++ % world.cookies.length] });
      client.on("response", (_status: number, _bytes: number, responseTime: number) => latencies.push(responseTime));
    },
  });
  return {
    cpuServer: cpuMs(server.child.pid!) - cpuBefore,
    cpuDatabase: database.stop(),
    latencies,
    requests: result.requests.total,
    seconds: options.seconds,
    errors: result.errors + result.timeouts + result.non2xx,
    rssBefore,
    rssAfter: server.rss(),
    kinds,
    sizes,
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
    kinds: parts.reduce((all, p) => {
      for (const [kind, k] of p.kinds) {
        const a = all.get(kind) ?? { sent: 0, failed: 0 };
        all.set(kind, { sent: a.sent + k.sent, failed: a.failed + k.failed });
      }
      return all;
    }, new Map<string, { sent: number; failed: number }>()),
    sizes: parts.reduce((all, p) => {
      for (const [route, k] of p.sizes) {
        const a = all.get(route) ?? { answers: 0, bytes: 0 };
        all.set(route, { answers: a.answers + k.answers, bytes: a.bytes + k.bytes });
      }
      return all;
    }, new Map<string, { answers: number; bytes: number }>()),
  };
}

async function drive(server: Running, world: World, name: string, options: Parameters<typeof run>[2]): Promise<Outcome> {
  return outcome(name, options.clients, [await run(server, world, options)]);
}

const pick = <T>(list: T[]): T => list[Math.floor(Math.random() * list.length)];

/** The scenarios, in order. */
function scenarios(world: World): [string, Parameters<typeof drive>[3]][] {
  const page = (): Req => ({ kind: "pages", path: pick(world.pages) });
  const bearer = () => ({ authorization: `Bearer ${pick(world.tokens)}`, "content-type": "application/json" });
  const save = (): Req => {
    const free = world.saves.filter((x) => !x.busy);
    if (free.length === 0) return page();
    const target = pick(free);
    target.busy = true;
    const width = 16 + Math.floor(Math.random() * 48);
    return {
      kind: "saves",
      method: "PUT",
      path: `/api/v1/effects/${target.id}`,
      headers: bearer(),
      body: JSON.stringify({ version: target.version, document: { ...JSON.parse(world.tables[0]), canvas: { width, height: 32 } } }),
      done(status, body) {
        target.busy = false;
        if (status === 200) target.version = (JSON.parse(body) as { version: number }).version;
      },
    };
  };
  const mix = (): Req => {
    const r = Math.random();
    if (r < 0.45) return page();
    if (r < 0.65) return { kind: "tables", method: "POST", path: "/api/v1/tables", headers: bearer(), body: pick(world.tables) };
    if (r < 0.75) return { kind: "bundles", path: pick(world.bundles), headers: { authorization: bearer().authorization } };
    if (r < 0.85) return { kind: "frames", path: pick(world.frames) };
    if (r < 0.9) return { kind: "documents", path: pick(world.documents) };
    return save();
  };
  const list: [string, Parameters<typeof drive>[3]][] = [
    ["floor", { clients: 10, seconds: 10, next: () => ({ kind: "healthz", path: "/healthz" }), signedIn: false }],
    ["page alone", { clients: 1, seconds: 10, next: page }],
    ["pages @10", { clients: 10, seconds: 20, next: page }],
    ["pages @20", { clients: 20, seconds: 20, next: page }],
    [`mix @${CLIENTS}`, { clients: CLIENTS, seconds: DURATION, next: mix }],
  ];
  return list.map(([name, options]) => [name, { ...options, seconds: options.seconds * SCALE }]);
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
  const paged = outcomes.find((o) => o.name.startsWith("pages"));
  if (paged)
    console.log(
      `  ${paged.name}, kB per page by route: ${[...paged.sizes].map(([route, k]) => `${route} ${(k.bytes / k.answers / 1024).toFixed(1)}`).join(", ")}`,
    );
  for (const o of outcomes.filter((x) => x.name.startsWith("mix")))
    console.log(`  ${o.name} by kind (sent / failed): ${[...o.kinds].map(([kind, k]) => `${kind} ${k.sent} / ${k.failed}`).join(", ")}`);
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
        // This checkout's migrations, for a baseline too: its factories seed the database, and an older commit's
        // code leaves alone the columns and indexes it does not know (an older commit's missing ones would fail the seed).
        await migrate(db, { migrationsFolder: path.join(ROOT, "drizzle") });
        log(`seeding ${target.label}`);
        world = await seed(db, secret);
      } finally {
        await db.$client.end();
      }
      const profileDir = args["cpu-prof"] ? path.join(WORK, `prof-${i}-${Date.now()}`) : undefined;
      running.push({ target, server: await startServer(target, databaseUrl, secret, profileDir), world, outcomes: [], profileDir });
    }
    if (args["save-pages"])
      for (const [i, r] of running.entries()) {
        const dir = path.join(WORK, "pages", `${i}-${r.target.label.replace(/\W+/g, "-")}`);
        mkdirSync(dir, { recursive: true });
        const seen = new Set<string>();
        for (const page of r.world.pages) {
          if (seen.has(routeOf(page))) continue;
          seen.add(routeOf(page));
          const answer = await fetch(`${r.server.url}${page}`, { headers: { cookie: r.world.cookies[0] } });
          writeFileSync(path.join(dir, `${routeOf(page)}.html`), await answer.text());
        }
        log(`pages of ${r.target.label} written to ${path.relative(ROOT, dir)}`);
      }
    // Both servers are up, idle but one; each scenario runs on every server in turn, so before and after meet the
    // same machine load (other work on the machine comes and goes).
    for (const r of running) {
      log(`warming up ${r.target.label} (5 s)`);
      await drive(r.server, r.world, "warm-up", { clients: 10, seconds: 5, next: scenarios(r.world)[4][1].next });
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
