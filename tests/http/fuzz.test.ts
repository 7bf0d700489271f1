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
import { eq } from "drizzle-orm";
import { sprites } from "../../app/db/schema.ts";
import { getEffect } from "../../app/models/effects.server.ts";
import { getProject } from "../../app/models/projects.server.ts";
import { getTargetProfile } from "../../app/models/targetProfiles.server.ts";
import { getTeam } from "../../app/models/teams.server.ts";
import { SPRITE_FORM_MAX_BYTES } from "../../app/sprites/forms.ts";
import { encodeCase, fuzzCases, messageOf, validEntries, validJsonBody, type FuzzTarget } from "../support/fuzz.ts";
import { makeWorld, refreshUses, snapshot, type World } from "../support/world.ts";

const RUNS = Number(process.env.SKEWSMITH_FUZZ_RUNS ?? 60);
/**
 * SKEWSMITH_FUZZ_SURVEY=1 only counts what the server answers, without failing: for measuring an older commit
 * (SKEWSMITH_SERVER_DIR, see tests/support/appServer.ts) against the same cases.
 */
const SURVEY = process.env.SKEWSMITH_FUZZ_SURVEY === "1";

/** The settings of a target profile form, shared by its creation and its edit. */
const PROFILE_FIELDS: NonNullable<FuzzTarget["fields"]> = {
  canvasWidth: { kind: "int", valid: "256", min: 1, max: 4096 },
  canvasHeight: { kind: "int", valid: "224", min: 1, max: 4096 },
  fixedPointBits: { kind: "enum", valid: "16", values: ["8", "16", "32"] },
  fixedPointFraction: { kind: "int", valid: "8", min: 0, max: 15 },
  rounding: { kind: "enum", valid: "nearest-away", values: ROUNDINGS },
  halfTurn: { kind: "enum", valid: "flip", values: HALF_TURNS },
  edges: { kind: "enum", valid: "wrap", values: EDGES },
  columnGroup: { kind: "int", valid: "1", min: 1, max: 4096 },
  labelPrefix: { kind: "token", valid: "rot", optional: true },
  maxColours: { kind: "int", valid: "16", min: 2, max: 256, optional: true },
};

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
      ...PROFILE_FIELDS,
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

  // Phase 2: the bench, sprites, profiles, members and invitations, tokens, and the JSON API.
  {
    name: "effect bench: save",
    path: (w) => `/effects/${w.effect.id}`,
    intent: "save",
    fields: {
      version: { kind: "version", valid: (w) => String(w.effect.version) },
      canvasWidth: { kind: "int", valid: "64", min: 1, max: 4096 },
      canvasHeight: { kind: "int", valid: "64", min: 1, max: 4096 },
      // Pivots may be halves, so they are broken as text that is no number at all.
      pivotX: { kind: "token", valid: "32" },
      pivotY: { kind: "token", valid: "32" },
      angleMode: { kind: "enum", valid: "sweep", values: ["sweep", "list"] },
      sweepFrom: { kind: "token", valid: "0" },
      sweepTo: { kind: "token", valid: "360" },
      sweepFrames: { kind: "int", valid: "16", min: 1, max: 4096 },
      spriteId: { kind: "uuid", valid: (w) => w.sprite.id, foreign: (w) => w.foreign.sprite.id, optional: true },
      targetProfileId: { kind: "uuid", valid: (w) => w.profile.id, optional: true },
      keyPixels: {
        kind: "json",
        valid: () => [[1, 2]],
        wrong: () => [[[1]], {}, [[1.5, 2]], [[99999, 0]], Array.from({ length: 300 }, (_, i) => [i, 0]), "x"],
        optional: true,
      },
    },
  },
  {
    name: "sprites: upload-sprite",
    path: (w) => `/projects/${w.project.id}/sprites`,
    intent: "upload-sprite",
    maxBytes: SPRITE_FORM_MAX_BYTES,
    fields: {
      name: { kind: "name", valid: "Fuzzed sprite", optional: true },
      file: { kind: "file", valid: (w) => new Uint8Array(w.sprite.png) },
    },
  },
  {
    name: "sprites: rename-sprite",
    path: (w) => `/projects/${w.project.id}/sprites`,
    intent: "rename-sprite",
    maxBytes: SPRITE_FORM_MAX_BYTES,
    fields: {
      spriteId: { kind: "uuid", valid: (w) => w.sprite.id, foreign: (w) => w.foreign.sprite.id },
      version: { kind: "version", valid: (w) => String(w.sprite.version) },
      name: { kind: "name", valid: "Fuzzed sprite name" },
    },
  },
  {
    name: "sprites: replace-sprite",
    path: (w) => `/projects/${w.project.id}/sprites`,
    intent: "replace-sprite",
    maxBytes: SPRITE_FORM_MAX_BYTES,
    fields: {
      spriteId: { kind: "uuid", valid: (w) => w.sprite.id, foreign: (w) => w.foreign.sprite.id },
      version: { kind: "version", valid: (w) => String(w.sprite.version) },
      file: { kind: "file", valid: (w) => new Uint8Array(w.sprite.png) },
    },
  },
  {
    name: "sprites: delete-sprite",
    path: (w) => `/projects/${w.project.id}/sprites`,
    intent: "delete-sprite",
    maxBytes: SPRITE_FORM_MAX_BYTES,
    fields: {
      spriteId: { kind: "uuid", valid: (w) => w.sprite.id, foreign: (w) => w.foreign.sprite.id },
      version: { kind: "version", valid: (w) => String(w.sprite.version) },
      // The effects the question showed as using the sprite, separated by commas.
      users: { kind: "uuid", valid: (w) => w.uses.sprite.join(","), optional: true },
    },
  },
  {
    name: "target profile: save-profile",
    path: (w) => `/teams/${w.team.id}/profiles/${w.profile.id}`,
    intent: "save-profile",
    fields: {
      name: { kind: "name", valid: "Fuzzed profile edit" },
      description: { kind: "description", valid: "", optional: true },
      version: { kind: "version", valid: (w) => String(w.profile.version) },
      ...PROFILE_FIELDS,
    },
  },
  {
    name: "target profile: duplicate-profile",
    path: (w) => `/teams/${w.team.id}/profiles/${w.profile.id}`,
    intent: "duplicate-profile",
    bodyOnly: true,
  },
  {
    name: "target profile: delete-profile",
    path: (w) => `/teams/${w.team.id}/profiles/${w.profile.id}`,
    intent: "delete-profile",
    fields: {
      confirmed: { kind: "enum", valid: "yes", values: ["yes"] },
      version: { kind: "version", valid: (w) => String(w.profile.version) },
      // How many effects the question showed as using the profile (any other count is refused: 409).
      effectCount: { kind: "int", valid: (w) => String(w.uses.profile), min: 1, max: 1 },
    },
  },
  {
    name: "target profiles: add-starters",
    path: (w) => `/teams/${w.team.id}/profiles`,
    intent: "add-starters",
    fields: { starter: { kind: "enum", valid: "6502-256x240", values: ["6502-256x240", "68000-320x224", "sm83-160x144"] } },
  },
  {
    name: "target profiles: duplicate-profile",
    path: (w) => `/teams/${w.team.id}/profiles`,
    intent: "duplicate-profile",
    fields: { profileId: { kind: "uuid", valid: (w) => w.profile.id } },
  },
  {
    name: "members: invite",
    path: (w) => `/teams/${w.team.id}/members`,
    intent: "invite",
    fields: {
      email: { kind: "token", valid: "fuzzed.invitee@example.com" },
      role: { kind: "enum", valid: "editor", values: ROLES },
    },
  },
  ...(["resend-invitation", "revoke-invitation"] as const).map((intent): FuzzTarget => ({
    name: `members: ${intent}`,
    path: (w) => `/teams/${w.team.id}/members`,
    intent,
    fields: { invitationId: { kind: "uuid", valid: (w) => w.invitation.id } },
  })),
  {
    name: "settings: create-token",
    path: () => "/settings",
    intent: "create-token",
    fields: {
      name: { kind: "name", valid: "Fuzzed token" },
      scope: { kind: "enum", valid: "read", values: ["read", "write"] },
      expiresInDays: { kind: "enum", valid: "30", values: ["7", "30", "90", "365", "never", ""], optional: true },
    },
  },
  {
    name: "settings: revoke-token",
    path: () => "/settings",
    intent: "revoke-token",
    fields: { tokenId: { kind: "uuid", valid: (w) => w.token.id } },
  },
  { name: "invitation: accept", path: (w) => `/invitations/${w.invitation.token}`, bodyOnly: true, as: "stranger" },
  {
    name: "API: POST /api/v1/tokens",
    path: () => "/api/v1/tokens",
    body: "json",
    fields: {
      name: { kind: "name", valid: "Fuzzed API token" },
      scope: { kind: "enum", valid: "read", values: ["read", "write"] },
      // 7, 30, 90 or 365 days, or null / "never" / "" for a token that lasts until revoked.
      expiresInDays: {
        kind: "json",
        valid: () => 30,
        wrong: () => [0, 1, 31, -7, 1e308, 30.5, "thirty", "7 days", {}, [], true],
        optional: true,
      },
    },
  },
  {
    name: "API: PUT /api/v1/effects/:id",
    path: (w) => `/api/v1/effects/${w.effect.id}`,
    method: "PUT",
    body: "json",
    fields: {
      version: { kind: "version", valid: (w) => String(w.effect.version) },
      document: { kind: "json", valid: (w) => w.effect.document, wrong: (w) => wrongDocuments(w.effect.document) },
    },
  },
  {
    name: "API: POST /api/v1/tables",
    path: () => "/api/v1/tables",
    body: "json",
    fields: Object.fromEntries(
      ["format", "canvas", "pivot", "angles", "fixedPoint"].map((key) => [
        key,
        {
          kind: "json",
          valid: (w: World) => (w.effect.document as unknown as Record<string, unknown>)[key],
          // Only the documents that break this very field (the others carry its valid value).
          wrong: (w: World) => {
            const valid = JSON.stringify((w.effect.document as unknown as Record<string, unknown>)[key]);
            return wrongDocuments(w.effect.document)
              .map((d) => (d as Record<string, unknown>)[key])
              .filter((v) => JSON.stringify(v) !== valid);
          },
          // Core fills in a missing format and fixed point (docs/shear-core.md: only canvas, pivot and angles are required).
          ...(key === "fixedPoint" || key === "format" ? { optional: true } : {}),
        },
      ]),
    ),
  },
];

/** Effect documents core must refuse (spec limits from docs/shear-core.md: canvas and frames 1–4096, bits 8/16/32). */
function wrongDocuments(valid: unknown): unknown[] {
  const d = valid as Record<string, unknown>;
  return [
    { ...d, format: "skewsmith.effect/0" },
    { ...d, canvas: { width: 0, height: 64 } },
    { ...d, canvas: { width: 1e9, height: 1e9 } },
    { ...d, canvas: "64x64" },
    { ...d, pivot: { x: -1e9, y: "centre" } },
    { ...d, angles: { list: [] } },
    { ...d, angles: { list: ["ten", null] } },
    { ...d, angles: { sweep: { from: 0, to: 360, frames: 4097 } } },
    { ...d, angles: { sweep: { from: 0, to: 360, frames: -1 } } },
    { ...d, angles: { list: Array.from({ length: 5000 }, (_, i) => i) } },
    { ...d, fixedPoint: { bits: 12, fraction: 4 } },
    { ...d, fixedPoint: { bits: 16, fraction: 99 } },
  ];
}

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
        const method = target.method ?? "POST";
        const response = await person.fetch(c.mode === "data" ? `${path}.data` : path, { method, body, headers });
        if (response.status >= 500) totals.fiveHundreds += 1;
        const message = await messageOf(response, c.mode).catch(() => null);
        const where = `${c.mode} ${method} ${target.name} with ${c.broken}: ${response.status} ${JSON.stringify(message)}`;
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
    // Deleting and archiving last: a deleted sprite or profile, or an archived project, takes no further change.
    const last = (t: FuzzTarget) => (t.intent === "archive-project" ? 2 : t.intent?.startsWith("delete-") ? 1 : 0);
    const ordered = [...changing].sort((a, b) => last(a) - last(b));
    for (const target of ordered) {
      // Each change bumps versions: the next target starts from what is there now, as a reloaded page would.
      Object.assign(control.effect, await getEffect(db, control.effect.id));
      Object.assign(control.profile, await getTargetProfile(db, control.profile.id));
      Object.assign(control.project, await getProject(db, control.project.id));
      Object.assign(control.team, await getTeam(db, control.team.id));
      const [sprite] = await db.select().from(sprites).where(eq(sprites.id, control.sprite.id));
      if (sprite) Object.assign(control.sprite, sprite);
      await refreshUses(db, control);
      const person = control.as[target.as ?? "owner"];
      let response: Response;
      if (target.body === "json") {
        response = await person.fetch(target.path(control), {
          method: target.method ?? "POST",
          headers: { "Content-Type": "application/json" },
          body: JSON.stringify(validJsonBody(target, control)),
        });
      } else {
        const entries = validEntries(target, control);
        const { body, headers } = encodeCase({
          mode: "document",
          broken: "nothing",
          body: { kind: "entries", entries, multipart: entries.some(([, v]) => typeof v !== "string") },
        });
        response = await person.fetch(target.path(control), { method: "POST", body, headers });
      }
      const refused = response.status >= 400 ? await messageOf(response, "document") : null;
      expect(response.status, `${target.name}: ${refused}`).toBeLessThan(400);
    }
  });
});
