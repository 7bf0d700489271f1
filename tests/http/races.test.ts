/**
 * Parallel requests as races: many people (or tabs) pressing the same button at the same moment, through the
 * whole server. A unique name under a race is resolved or a clear 409, never a 500; a change from an old copy is
 * refused, so exactly one of many saves from one version wins and nothing is overwritten unseen.
 */
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { createDb } from "../../app/db/client.server.ts";
import { getEffect, listEffects } from "../../app/models/effects.server.ts";
import { getProject } from "../../app/models/projects.server.ts";
import { getTeam } from "../../app/models/teams.server.ts";
import { getTargetProfile } from "../../app/models/targetProfiles.server.ts";
import { listSprites } from "../../app/models/sprites.server.ts";
import { listActivity } from "../../app/models/activity.server.ts";
import { makeWorld, type World } from "../support/world.ts";
import { messageOf } from "../support/fuzz.ts";
import { PROFILE_FORM } from "../factories.ts";

const db = createDb(process.env.DATABASE_URL!, { max: 2 });
let world: World;
beforeAll(async () => {
  world = await makeWorld(db, inject("appUrl"), inject("githubUrl"));
});
afterAll(() => db.$client.end());

describe("duplicating an effect twenty times at once", () => {
  it("makes twenty copies with twenty names, every request answered 200", async () => {
    const before = (await listEffects(db, world.project.id)).length;
    const responses = await Promise.all(
      Array.from({ length: 20 }, (_, i) =>
        (i % 2 ? world.as.owner : world.as.editor).post(`/projects/${world.project.id}.data`, {
          intent: "duplicate-effect",
          effectId: world.effect.id,
        }),
      ),
    );
    expect(responses.map((r) => r.status)).toEqual(Array(20).fill(200));
    const names = (await listEffects(db, world.project.id)).map((e) => e.name).filter((n) => n.startsWith(`${world.effect.name} copy`));
    expect(names).toHaveLength(20);
    expect(new Set(names.map((n) => n.toLowerCase())).size).toBe(20);
    expect((await listEffects(db, world.project.id)).length).toBe(before + 20);
  });
});

describe("creating things of one name at once", () => {
  it("creates one effect and answers the rest 409 with the reason, never 500", async () => {
    const responses = await Promise.all(
      Array.from({ length: 12 }, () =>
        world.as.owner.post(`/projects/${world.project.id}.data`, { intent: "create-effect", name: "Raced beam" }),
      ),
    );
    const statuses = responses.map((r) => r.status).sort();
    expect(statuses.filter((s) => s === 200)).toHaveLength(1);
    expect(statuses.filter((s) => s === 409)).toHaveLength(11);
    const refused = responses.find((r) => r.status === 409)!;
    expect(await messageOf(refused, "data")).toBe("The project already has an effect called “Raced beam”. Choose another name.");
  });

  it("gives teams of one name made at once distinct handles", async () => {
    const name = `Raced crew ${Date.now().toString(36)}`;
    const responses = await Promise.all(
      Array.from({ length: 10 }, () => world.as.owner.post("/teams/new", { intent: "create-team", name })),
    );
    expect(responses.map((r) => r.status)).toEqual(Array(10).fill(302));
    expect(new Set(responses.map((r) => r.headers.get("Location"))).size).toBe(10);
  });
});

describe("saves from one version", () => {
  async function race(post: (i: number) => Promise<Response>, n: number) {
    const responses = await Promise.all(Array.from({ length: n }, (_, i) => post(i)));
    const won = responses.flatMap((r, i) => (r.status === 200 ? [i] : []));
    const refused = responses.filter((r) => r.status === 409);
    expect(won).toHaveLength(1);
    expect(refused).toHaveLength(n - 1);
    for (const r of refused)
      expect(await messageOf(r, "data")).toMatch(
        // The bench names who saved (the conflict notice shows their change); the other forms say "Someone".
        /^(Someone changed (this (effect|project|team|target profile)|\S+) after you opened it|.+ saved this effect \(version \d+\) after you opened version \d+\. Nothing was overwritten)/,
      );
    return won[0];
  }

  it("renaming an effect: exactly one of ten wins per version, the name is the winner's, each win recorded once", async () => {
    for (let round = 0; round < 3; round++) {
      const { version } = (await getEffect(db, world.effect.id))!;
      const i = await race(
        (k) =>
          world.as.editor.post(`/projects/${world.project.id}.data`, {
            intent: "rename-effect",
            effectId: world.effect.id,
            name: `Beam r${round} #${k}`,
            version: String(version),
          }),
        10,
      );
      expect(await getEffect(db, world.effect.id)).toMatchObject({ name: `Beam r${round} #${i}`, version: version + 1 });
    }
    const renames = (await listActivity(db, { teamId: world.team.id, projectId: world.project.id }, 100)).filter(
      (a) => a.action === "effect.renamed",
    );
    expect(renames).toHaveLength(3);
  });

  it("the bench's document save: one of eight wins per version, the document is the winner's, each win recorded once", async () => {
    for (let round = 0; round < 3; round++) {
      const { version } = (await getEffect(db, world.effect.id))!;
      const i = await race(
        (k) =>
          world.as.editor.post(`/effects/${world.effect.id}.data`, {
            intent: "save",
            version: String(version),
            canvasWidth: String(40 + round * 8 + k),
            canvasHeight: "32",
            pivotX: "16",
            pivotY: "16",
            angleMode: "list",
            angleList: `0\n${10 + k}`,
            spriteId: world.sprite.id,
          }),
        8,
      );
      const saved = (await getEffect(db, world.effect.id))!;
      expect(saved.version).toBe(version + 1);
      expect(saved.document).toMatchObject({ canvas: { width: 40 + round * 8 + i, height: 32 }, angles: { list: [0, 10 + i] } });
    }
    const saves = (await listActivity(db, { teamId: world.team.id, projectId: world.project.id }, 100)).filter(
      (a) => a.action === "effect.saved",
    );
    expect(saves).toHaveLength(3);
  });

  it("a target profile's edit and a sprite's rename: one winner per version, the rest refused", async () => {
    const profile = (await getTargetProfile(db, world.profile.id))!;
    const p = await race(
      (k) =>
        world.as.owner.post(`/teams/${world.team.id}/profiles/${world.profile.id}.data`, {
          intent: "save-profile",
          version: String(profile.version),
          name: `Raced profile ${k}`,
          ...PROFILE_FORM,
        }),
      8,
    );
    expect((await getTargetProfile(db, world.profile.id))!).toMatchObject({ name: `Raced profile ${p}`, version: profile.version + 1 });
    const sprite = (await listSprites(db, world.project.id)).find((x) => x.id === world.sprite.id)!;
    const s = await race(
      (k) =>
        world.as.editor.post(`/projects/${world.project.id}/sprites.data`, {
          intent: "rename-sprite",
          spriteId: world.sprite.id,
          version: String(sprite.version),
          name: `raced-${k}.png`,
        }),
      8,
    );
    const renamed = (await listSprites(db, world.project.id)).find((x) => x.id === world.sprite.id)!;
    expect(renamed).toMatchObject({ name: `raced-${s}.png`, version: sprite.version + 1 });
  });

  it("project details and the team's name: one winner each, the others told to reload", async () => {
    const project = (await getProject(db, world.project.id))!;
    const p = await race(
      (k) =>
        world.as.owner.post(`/projects/${world.project.id}.data`, {
          intent: "update-project",
          name: project.name,
          description: `Written by tab ${k}`,
          version: String(project.version),
        }),
      8,
    );
    expect((await getProject(db, world.project.id))!.description).toBe(`Written by tab ${p}`);
    const team = (await getTeam(db, world.team.id))!;
    const t = await race(
      (k) =>
        world.as.owner.post(`/teams/${world.team.id}.data`, {
          intent: "rename-team",
          name: `Crew by tab ${k}`,
          version: String(team.version),
        }),
      8,
    );
    expect((await getTeam(db, world.team.id))!).toMatchObject({ name: `Crew by tab ${t}`, version: team.version + 1 });
  });
});
