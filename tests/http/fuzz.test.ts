/**
 * Every form action the app has, fuzzed (tests/support/fuzz.ts says how; add new forms and API bodies to TARGETS).
 * Per target: SKEWSMITH_FUZZ_RUNS cases (default 60), each a 4xx with a message and no change to the database;
 * and one control request with the valid body, which must be accepted, so a broken body is what was refused.
 */
import fc from "fast-check";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { EDGES, HALF_TURNS, ROUNDINGS } from "@skewsmith/core";
import { createDb } from "../../app/db/client.server.ts";
import { ROLES } from "../../app/roles.ts";
import { encodeCase, fuzzCases, messageOf, validEntries, type FuzzTarget } from "../support/fuzz.ts";
import { makeWorld, snapshot, type World } from "../support/world.ts";

const RUNS = Number(process.env.SKEWSMITH_FUZZ_RUNS ?? 60);
/**
 * SKEWSMITH_FUZZ_SURVEY=1 only counts what the server answers, without failing: for measuring an older commit
 * (SKEWSMITH_SERVER_DIR, see tests/support/appServer.ts) against the same cases.
 */
const SURVEY = process.env.SKEWSMITH_FUZZ_SURVEY === "1";

export const TARGETS: FuzzTarget[] = [
  { name: "home (no action)", path: () => "/", bodyOnly: true, intent: "create-team" },
  {
    name: "new team: create-team",
    path: () => "/teams/new",
    intent: "create-team",
    fields: { name: { kind: "name", valid: "Fuzzed crew" } },
  },
  {
    name: "team: create-project",
    path: (w) => `/teams/${w.team.id}`,
    intent: "create-project",
    fields: { name: { kind: "name", valid: "Fuzzed level" }, description: { kind: "description", valid: "A level.", optional: true } },
  },
  {
    name: "team: restore-project",
    path: (w) => `/teams/${w.team.id}`,
    intent: "restore-project",
    fields: { projectId: { kind: "uuid", valid: (w) => w.archived.id, foreign: (w) => w.foreign.project.id } },
  },
  {
    name: "new target profile: create-profile",
    path: (w) => `/teams/${w.team.id}/profiles/new`,
    intent: "create-profile",
    fields: {
      name: { kind: "name", valid: "Fuzzed profile" },
      description: { kind: "description", valid: "", optional: true },
      canvasWidth: { kind: "int", valid: "256", min: 1, max: 4096 },
      canvasHeight: { kind: "int", valid: "224", min: 1, max: 4096 },
      fixedPointBits: { kind: "enum", valid: "16", values: ["8", "16", "32"] },
      fixedPointFraction: { kind: "int", valid: "8", min: 0, max: 15 },
      rounding: { kind: "enum", valid: "nearest-away", values: ROUNDINGS },
      halfTurn: { kind: "enum", valid: "flip", values: HALF_TURNS },
      edges: { kind: "enum", valid: "wrap", values: EDGES },
      columnGroup: { kind: "int", valid: "1", min: 1, max: 4096 },
      labelPrefix: { kind: "token", valid: "rot", optional: true },
    },
  },
  {
    name: "team: rename-team",
    path: (w) => `/teams/${w.team.id}`,
    intent: "rename-team",
    fields: { name: { kind: "name", valid: "Renamed by the fuzzer" }, version: { kind: "version", valid: (w) => String(w.team.version) } },
  },
  {
    name: "members: change-role",
    path: (w) => `/teams/${w.team.id}/members`,
    intent: "change-role",
    fields: {
      userId: { kind: "uuid", valid: (w) => w.viewer.id, foreign: (w) => w.stranger.id },
      role: { kind: "enum", valid: "editor", values: ROLES },
    },
  },
  {
    name: "members: remove-member",
    path: (w) => `/teams/${w.team.id}/members`,
    intent: "remove-member",
    fields: {
      userId: { kind: "uuid", valid: (w) => w.viewer.id, foreign: (w) => w.stranger.id },
      confirmed: { kind: "enum", valid: "yes", values: ["yes"], firstWins: true },
    },
  },
  { name: "team: leave-team", path: (w) => `/teams/${w.team.id}`, intent: "leave-team", as: "editor" },
  {
    name: "project: update-project",
    path: (w) => `/projects/${w.project.id}`,
    intent: "update-project",
    fields: {
      name: { kind: "name", valid: "Fuzzed project" },
      description: { kind: "description", valid: "Changed.", optional: true },
      version: { kind: "version", valid: (w) => String(w.project.version) },
    },
  },
  { name: "project: archive-project", path: (w) => `/projects/${w.project.id}`, intent: "archive-project" },
  { name: "project: restore-project", path: (w) => `/projects/${w.archived.id}`, intent: "restore-project" },
  {
    name: "project: create-effect",
    path: (w) => `/projects/${w.project.id}`,
    intent: "create-effect",
    fields: {
      name: { kind: "name", valid: "Fuzzed effect" },
      targetProfileId: { kind: "uuid", valid: (w) => w.profile.id, optional: true },
    },
  },
  {
    name: "project: rename-effect",
    path: (w) => `/projects/${w.project.id}`,
    intent: "rename-effect",
    fields: {
      effectId: { kind: "uuid", valid: (w) => w.effect.id, foreign: (w) => w.foreign.effect.id },
      name: { kind: "name", valid: "Fuzzed name" },
      version: { kind: "version", valid: (w) => String(w.effect.version) },
    },
  },
  ...(["duplicate-effect", "delete-effect"] as const).map((intent): FuzzTarget => ({
    name: `project: ${intent}`,
    path: (w) => `/projects/${w.project.id}`,
    intent,
    fields: { effectId: { kind: "uuid", valid: (w) => w.effect.id, foreign: (w) => w.foreign.effect.id } },
  })),
  {
    name: "project: restore-effect",
    path: (w) => `/projects/${w.project.id}`,
    intent: "restore-effect",
    fields: { effectId: { kind: "uuid", valid: (w) => w.deleted.id, foreign: (w) => w.foreign.effect.id } },
  },
  { name: "effect (no action)", path: (w) => `/effects/${w.effect.id}`, bodyOnly: true, intent: "rename-effect" },
  { name: "sign-out", path: () => "/sign-out", bodyOnly: true },
  { name: "sign-in start (auth/github)", path: () => "/auth/github", bodyOnly: true },
  { name: "mailbox: send-test", path: () => "/dev/mailbox", intent: "send-test" },
];

const db = createDb(process.env.DATABASE_URL!, { max: 4 });
let world: World;
const totals = { cases: 0, fiveHundreds: 0, notClientErrors: 0, withoutMessage: 0, changed: 0 };

beforeAll(async () => {
  world = await makeWorld(db, inject("appUrl"), inject("githubUrl"));
});
afterAll(async () => {
  console.log(
    `fuzz: ${totals.cases} cases over ${TARGETS.length} targets: ${totals.fiveHundreds} answered 5xx, ${totals.notClientErrors} not a 4xx, ` +
      `${totals.withoutMessage} without a message, ${totals.changed} changed the database`,
  );
  await db.$client.end();
});

describe.each(TARGETS)("fuzzing $name", (target) => {
  it(`answers ${RUNS} broken bodies with a 4xx and a message, and changes nothing`, async () => {
    // Every case is checked against the state just before it, and what went wrong is collected rather than thrown:
    // a thrown failure would make fast-check shrink by re-running cases against an already changed database, and
    // report whichever case it re-ran last instead of the one that changed it.
    let before = await snapshot(db, world);
    const problems: string[] = [];
    const person = world.as[target.as ?? "owner"];
    await fc.assert(
      fc.asyncProperty(fuzzCases(target, world), async (c) => {
        totals.cases += 1;
        const path = target.path(world);
        const { body, headers } = encodeCase(c);
        const response = await person.fetch(c.mode === "data" ? `${path}.data` : path, { method: "POST", body, headers });
        if (response.status >= 500) totals.fiveHundreds += 1;
        const message = await messageOf(response, c.mode).catch(() => null);
        const where = `${c.mode} POST ${target.name} with ${c.broken}: ${response.status} ${JSON.stringify(message)}`;
        const now = await snapshot(db, world);
        const changed = now !== before;
        before = now;
        if (response.status < 400 || response.status >= 500) totals.notClientErrors += 1;
        if (!message) totals.withoutMessage += 1;
        if (changed) totals.changed += 1;
        if (SURVEY) {
          if (response.status >= 500) console.log(`5xx: ${where}`);
          return;
        }
        if (response.status < 400 || response.status >= 500) problems.push(`not a 4xx: ${where}`);
        else if (!message) problems.push(`no message: ${where}`);
        if (changed) problems.push(`the database changed: ${where}`);
      }),
      { numRuns: RUNS },
    );
    expect(problems).toEqual([]);
  });
});

describe.skipIf(SURVEY)("the fuzzer's valid bodies (the control: what the cases break was acceptable)", () => {
  it("accepts the valid body of every target that changes something", async () => {
    // A world of its own, so the changes these make do not touch the fuzzed one.
    const control = await makeWorld(db, inject("appUrl"), inject("githubUrl"));
    const changing = TARGETS.filter((t) => !t.bodyOnly && t.intent !== "leave-team" && t.intent !== "send-test");
    // Archiving last: an archived project takes no further change.
    const ordered = [...changing.filter((t) => t.intent !== "archive-project"), ...changing.filter((t) => t.intent === "archive-project")];
    for (const target of ordered) {
      const params = validEntries(target, control).filter((e): e is [string, string] => typeof e[1] === "string");
      const response = await control.as[target.as ?? "owner"].post(target.path(control), params);
      const refused = response.status >= 400 ? await messageOf(response, "document") : null;
      expect(response.status, `${target.name}: ${refused}`).toBeLessThan(400);
    }
  });
});
