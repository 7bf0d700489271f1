import { parseEffect } from "@skewsmith/core";
import { eq } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { makeEffect, makeProject, makeSprite, makeTargetProfile, makeTeam, makeUser } from "../../tests/factories.ts";
import { testDb } from "../../tests/support/db.ts";
import { effects } from "../db/schema.ts";
import { newEffectDocument } from "../effects/settings.ts";
import {
  createEffect,
  deleteEffect,
  duplicateEffect,
  getEffect,
  listEffects,
  renameEffect,
  restoreEffect,
  saveEffectDocument,
} from "./effects.server.ts";
import { archiveProject } from "./projects.server.ts";

const db = testDb();
afterAll(() => db.$client.end());

async function setup() {
  const owner = await makeUser(db);
  const team = await makeTeam(db, { owner });
  const project = await makeProject(db, { team, actor: owner });
  return { owner, team, project };
}

describe("createEffect", () => {
  it("starts from the spec's defaults: a 64 × 64 canvas, centred pivot and a 64-frame full turn", async () => {
    const { owner, project } = await setup();
    const effect = await createEffect(db, { projectId: project.id, name: "Spinner", actorId: owner.id });
    expect(effect.version).toBe(1);
    expect(effect.document).toEqual(
      parseEffect({ canvas: { width: 64, height: 64 }, pivot: { x: 32, y: 32 }, angles: { sweep: { from: 0, to: 360, frames: 64 } } }),
    );
    // What went into jsonb comes back equal, with every default present.
    const stored = await getEffect(db, effect.id);
    expect(stored?.document).toEqual(effect.document);
    expect(stored?.document.rounding).toBe("nearest-away");
  });

  it("takes canvas and arithmetic from the chosen target profile", async () => {
    const { owner, team, project } = await setup();
    const profile = await makeTargetProfile(db, {
      team,
      canvasWidth: 256,
      canvasHeight: 224,
      fixedPointBits: 8,
      fixedPointFraction: 6,
      columnGroup: 16,
    });
    const effect = await createEffect(db, { projectId: project.id, name: "Tilt", targetProfileId: profile.id, actorId: owner.id });
    expect(effect.targetProfileId).toBe(profile.id);
    expect(effect.document).toEqual(newEffectDocument(profile));
    expect(effect.document.pivot).toEqual({ x: 128, y: 112 });
    expect(effect.document.columnGroup).toBe(16);
  });

  it("refuses a target profile or sprite of another team's project", async () => {
    const a = await setup();
    const b = await setup();
    const foreignProfile = await makeTargetProfile(db, { team: b.team });
    const foreignSprite = await makeSprite(db, { project: b.project, actor: b.owner });
    await expect(
      createEffect(db, { projectId: a.project.id, name: "X", targetProfileId: foreignProfile.id, actorId: a.owner.id }),
    ).rejects.toMatchObject({
      field: "targetProfileId",
    });
    await expect(
      createEffect(db, { projectId: a.project.id, name: "Y", spriteId: foreignSprite.id, actorId: a.owner.id }),
    ).rejects.toMatchObject({
      field: "spriteId",
    });
  });

  it("stores a given document only after core accepts it, naming the bad field otherwise", async () => {
    const { owner, project } = await setup();
    const bad = { canvas: { width: 0, height: 16 }, pivot: { x: 0, y: 0 }, angles: { list: [0] } };
    await expect(createEffect(db, { projectId: project.id, name: "Bad", document: bad, actorId: owner.id })).rejects.toThrow(
      /canvas\.width: 0 is not allowed; allowed a whole number from 1 to 4096/,
    );
    expect(await listEffects(db, project.id)).toEqual([]);
  });

  it("refuses a duplicate live name in the project, whatever the case", async () => {
    const { owner, project } = await setup();
    await makeEffect(db, { project, actor: owner, name: "Wobble" });
    await expect(makeEffect(db, { project, actor: owner, name: "WOBBLE" })).rejects.toMatchObject({ field: "name", status: 409 });
  });

  it("refuses new effects in an archived project", async () => {
    const { owner, project } = await setup();
    await archiveProject(db, { projectId: project.id, actorId: owner.id });
    await expect(makeEffect(db, { project, actor: owner })).rejects.toThrow(/archived/);
  });
});

describe("duplicateEffect, renameEffect, deleteEffect, restoreEffect", () => {
  it("duplicates under the first free copy name with the same document, profile and sprite", async () => {
    const { owner, team, project } = await setup();
    const profile = await makeTargetProfile(db, { team });
    const sprite = await makeSprite(db, { project, actor: owner });
    const source = await makeEffect(db, { project, actor: owner, name: "Rose", targetProfile: profile, sprite });
    const first = await duplicateEffect(db, { effectId: source.id, actorId: owner.id });
    const second = await duplicateEffect(db, { effectId: source.id, actorId: owner.id });
    expect([first.name, second.name]).toEqual(["Rose copy", "Rose copy 2"]);
    expect(first.document).toEqual(source.document);
    expect([first.targetProfileId, first.spriteId, first.version]).toEqual([profile.id, sprite.id, 1]);
  });

  it("renames, refusing a name another live effect has", async () => {
    const { owner, project } = await setup();
    const a = await makeEffect(db, { project, actor: owner, name: "A" });
    await makeEffect(db, { project, actor: owner, name: "B" });
    await expect(renameEffect(db, { effectId: a.id, name: "b", expectedVersion: 1, actorId: owner.id })).rejects.toMatchObject({
      field: "name",
    });
    await renameEffect(db, { effectId: a.id, name: "A prime", expectedVersion: 1, actorId: owner.id });
    expect((await listEffects(db, project.id)).map((e) => e.name)).toEqual(["A prime", "B"]);
  });

  it("deletes softly: the row stays, leaves the list, and comes back on restore", async () => {
    const { owner, project } = await setup();
    const effect = await makeEffect(db, { project, actor: owner, name: "Temporary" });
    await deleteEffect(db, { effectId: effect.id, actorId: owner.id });
    expect(await listEffects(db, project.id)).toEqual([]);
    expect((await listEffects(db, project.id, { deleted: true })).map((e) => e.id)).toEqual([effect.id]);
    const [row] = await db.select().from(effects).where(eq(effects.id, effect.id));
    expect(row.deletedAt).toBeInstanceOf(Date);
    await restoreEffect(db, { effectId: effect.id, actorId: owner.id });
    expect((await listEffects(db, project.id)).map((e) => e.id)).toEqual([effect.id]);
  });

  it("does not restore over a new effect of the same name", async () => {
    const { owner, project } = await setup();
    const old = await makeEffect(db, { project, actor: owner, name: "Twin" });
    await deleteEffect(db, { effectId: old.id, actorId: owner.id });
    await makeEffect(db, { project, actor: owner, name: "Twin" });
    await expect(restoreEffect(db, { effectId: old.id, actorId: owner.id })).rejects.toThrow(/Another effect is now called “Twin”/);
  });
});

describe("saveEffectDocument", () => {
  it("saves a valid document and bumps the version; a stale version is refused and nothing changes", async () => {
    const { owner, project } = await setup();
    const effect = await makeEffect(db, { project, actor: owner });
    const changed = { ...effect.document, edges: "clip" };
    const saved = await saveEffectDocument(db, { effectId: effect.id, document: changed, expectedVersion: 1, actorId: owner.id });
    expect(saved.version).toBe(2);
    expect(saved.document.edges).toBe("clip");
    await expect(
      saveEffectDocument(db, { effectId: effect.id, document: { ...changed, edges: "wrap" }, expectedVersion: 1, actorId: owner.id }),
    ).rejects.toMatchObject({
      status: 409,
      message: expect.stringMatching(/Someone saved this effect after you opened it \(now version 2/),
    });
    expect((await getEffect(db, effect.id))?.document.edges).toBe("clip");
  });

  it("refuses an invalid document and keeps the saved one", async () => {
    const { owner, project } = await setup();
    const effect = await makeEffect(db, { project, actor: owner });
    await expect(
      saveEffectDocument(db, {
        effectId: effect.id,
        document: { ...effect.document, columnGroup: 65 },
        expectedVersion: 1,
        actorId: owner.id,
      }),
    ).rejects.toThrow(/columnGroup: 65 is not allowed/);
    expect(await getEffect(db, effect.id)).toMatchObject({ version: 1, document: effect.document });
  });
});

describe("createTargetProfile (through the factory)", () => {
  it("names the form field when core refuses the settings, and refuses a duplicate name", async () => {
    const { team } = await setup();
    await expect(makeTargetProfile(db, { team, fixedPointBits: 8, fixedPointFraction: 8 })).rejects.toMatchObject({
      field: "fixedPointFraction",
      message: "Fraction bits: 8 is not allowed; allowed a whole number from 0 to 7 (below bits = 8)",
    });
    await expect(makeTargetProfile(db, { team, canvasWidth: 8, columnGroup: 16 })).rejects.toMatchObject({ field: "columnGroup" });
    await makeTargetProfile(db, { team, name: "Title screen" });
    await expect(makeTargetProfile(db, { team, name: "title SCREEN" })).rejects.toMatchObject({ field: "name", status: 409 });
  });
});

describe("effects under races and stale copies", () => {
  it("gives twenty duplicates made at the same moment twenty copies with distinct names", async () => {
    const { owner, project } = await setup();
    const source = await makeEffect(db, { project, actor: owner, name: "Beam" });
    const copies = await Promise.all(Array.from({ length: 20 }, () => duplicateEffect(db, { effectId: source.id, actorId: owner.id })));
    const names = copies.map((c) => c.name);
    expect(new Set(names).size).toBe(20);
    expect(names.sort()).toEqual(["Beam copy", ...Array.from({ length: 19 }, (_, i) => `Beam copy ${i + 2}`)].sort());
    expect(await listEffects(db, project.id)).toHaveLength(21);
  });

  it("refuses a rename from a stale version, and lets exactly one of many renames from one version win", async () => {
    const { owner, project } = await setup();
    const effect = await makeEffect(db, { project, actor: owner, name: "Sweep" });
    for (const version of [1, 2, 3, 4]) {
      const names = Array.from({ length: 6 }, (_, i) => `Sweep ${version}.${i}`);
      const results = await Promise.allSettled(
        names.map((name) => renameEffect(db, { effectId: effect.id, name, expectedVersion: version, actorId: owner.id })),
      );
      const won = results.flatMap((r, i) => (r.status === "fulfilled" ? [names[i]] : []));
      expect(won, `from version ${version}`).toHaveLength(1);
      for (const r of results) if (r.status === "rejected") expect(r.reason).toMatchObject({ status: 409, field: "name" });
      expect(await getEffect(db, effect.id)).toMatchObject({ name: won[0], version: version + 1 });
    }
    await expect(renameEffect(db, { effectId: effect.id, name: "Old copy", expectedVersion: 2, actorId: owner.id })).rejects.toThrow(
      /Someone changed this effect after you opened it \(it is now “Sweep 4\.\d”, version 5; you started from version 2\)/,
    );
  });

  it("keeps every document save or refuses it: parallel saves from one version leave exactly one winner, nothing lost unseen", async () => {
    const { owner, project } = await setup();
    const effect = await makeEffect(db, { project, actor: owner });
    let version = effect.version;
    for (let round = 0; round < 3; round++) {
      const frames = [8, 16, 24, 32, 40];
      const results = await Promise.allSettled(
        frames.map((n) =>
          saveEffectDocument(db, {
            effectId: effect.id,
            document: { canvas: { width: 32, height: 32 }, pivot: { x: 16, y: 16 }, angles: { sweep: { from: 0, to: 360, frames: n } } },
            expectedVersion: version,
            actorId: owner.id,
          }),
        ),
      );
      const winners = results.flatMap((r, i) => (r.status === "fulfilled" ? [frames[i]] : []));
      expect(winners).toHaveLength(1);
      for (const r of results) if (r.status === "rejected") expect(r.reason).toMatchObject({ status: 409 });
      const now = (await getEffect(db, effect.id))!;
      expect(now.version).toBe(version + 1);
      expect((now.document.angles as { sweep: { frames: number } }).sweep.frames).toBe(winners[0]);
      version = now.version;
    }
  });
});
