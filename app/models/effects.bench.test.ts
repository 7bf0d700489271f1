import { parseEffect } from "@skewsmith/core";
import { and, eq } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { makeEffect, makeProject, makeSprite, makeTargetProfile, makeTeam, makeUser } from "../../tests/factories.ts";
import { testDb } from "../../tests/support/db.ts";
import { activity } from "../db/schema.ts";
import { compassRose } from "../demo/art.ts";
import { spriteColours } from "../sprites/colours.ts";
import { DomainError } from "./errors.ts";
import { getEffect, saveEffectBench, type BenchSaveInput } from "./effects.server.ts";

const db = testDb();
afterAll(() => db.$client.end());

async function setup() {
  const owner = await makeUser(db);
  const team = await makeTeam(db, { owner });
  const project = await makeProject(db, { team, actor: owner });
  const sprite = await makeSprite(db, { project, actor: owner });
  const effect = await makeEffect(db, { project, actor: owner });
  return { owner, team, project, sprite, effect };
}

const base = (effectId: string, actorId: string, version = 1): BenchSaveInput => ({
  effectId,
  expectedVersion: version,
  actorId,
  document: parseEffect({ canvas: { width: 48, height: 40 }, pivot: { x: 24, y: 20 }, angles: { list: [0, 15, 30] } }),
  targetProfileId: null,
  followsProfile: false,
  spriteId: null,
  spriteX: null,
  spriteY: null,
  keyPixels: [],
});

describe("saveEffectBench", () => {
  it("refuses a sprite with more colours than the chosen target profile allows, naming the limit; nothing is saved", async () => {
    const { owner, team, sprite, effect } = await setup();
    const colours = spriteColours(compassRose(16)); // the factories' sprite
    const narrow = await makeTargetProfile(db, { team, actor: owner, name: "Two colours", maxColours: 2 });
    expect(colours).toBeGreaterThan(2);
    const error = await saveEffectBench(db, { ...base(effect.id, owner.id), targetProfileId: narrow.id, spriteId: sprite.id }).then(
      () => null,
      (e: unknown) => e,
    );
    expect(error).toBeInstanceOf(DomainError);
    expect((error as DomainError).field).toBe("spriteId");
    expect((error as DomainError).message).toBe(
      `${sprite.name} uses ${colours} colours (the background included); the target profile Two colours allows at most 2. Reduce its colours, or raise the profile's limit.`,
    );
    expect((await getEffect(db, effect.id))!.version).toBe(1);

    const wide = await makeTargetProfile(db, { team, actor: owner, name: "Full palette", maxColours: colours });
    const saved = await saveEffectBench(db, { ...base(effect.id, owner.id), targetProfileId: wide.id, spriteId: sprite.id });
    expect(saved.ok).toBe(true);
  });

  it("saves the document, sprite, placement and key pixels in one version, and records what changed", async () => {
    const { owner, sprite, effect } = await setup();
    const result = await saveEffectBench(db, {
      ...base(effect.id, owner.id),
      spriteId: sprite.id,
      spriteX: 3,
      spriteY: null,
      keyPixels: [[4, 5]],
    });
    expect(result.ok).toBe(true);
    const saved = await getEffect(db, effect.id);
    expect(saved).toMatchObject({ version: 2, spriteId: sprite.id, spriteX: 3, spriteY: null, keyPixels: [[4, 5]] });
    expect(saved!.document.angles).toEqual({ list: [0, 15, 30] });
    const [entry] = await db
      .select()
      .from(activity)
      .where(and(eq(activity.projectId, effect.projectId), eq(activity.action, "effect.saved")));
    expect(entry.summary.replace(effect.name, "NAME")).toBe(
      "saved version 2 of NAME (canvas, pivot, angle track, sprite, sprite placement, key pixels)",
    );
  });

  it("refuses a save that starts from an old version and hands back the row as it is now", async () => {
    const { owner, effect } = await setup();
    expect((await saveEffectBench(db, base(effect.id, owner.id))).ok).toBe(true);
    const stale = await saveEffectBench(db, {
      ...base(effect.id, owner.id),
      document: parseEffect({ ...(base("", "").document as object), pivot: { x: 1, y: 1 } }),
    });
    expect(stale.ok).toBe(false);
    if (stale.ok) return;
    expect(stale.current.version).toBe(2);
    expect((await getEffect(db, effect.id))!.document.pivot).toEqual({ x: 24, y: 20 });
  });

  it("lets exactly one of two saves from the same version through when they race", async () => {
    const { owner, effect } = await setup();
    const a = { ...base(effect.id, owner.id), document: parseEffect({ ...(base("", "").document as object), pivot: { x: 10, y: 10 } }) };
    const b = { ...base(effect.id, owner.id), document: parseEffect({ ...(base("", "").document as object), pivot: { x: 20, y: 20 } }) };
    const results = await Promise.all([saveEffectBench(db, a), saveEffectBench(db, b)]);
    expect(results.filter((r) => r.ok)).toHaveLength(1);
    const loser = results.find((r) => !r.ok);
    expect(loser && !loser.ok && loser.current.version).toBe(2);
    expect((await getEffect(db, effect.id))!.version).toBe(2);
  });

  it("keeps the version when nothing changed", async () => {
    const { owner, effect } = await setup();
    const first = await saveEffectBench(db, base(effect.id, owner.id));
    const again = await saveEffectBench(db, base(effect.id, owner.id, 2));
    expect(first.ok && again.ok && again.changed).toEqual([]);
    expect((await getEffect(db, effect.id))!.version).toBe(2);
  });

  it("takes the profile's settings while the effect follows it, and the person's own once detached", async () => {
    const { owner, team, effect } = await setup();
    const profile = await makeTargetProfile(db, {
      team,
      canvasWidth: 64,
      canvasHeight: 48,
      fixedPointBits: 8,
      fixedPointFraction: 6,
      columnGroup: 4,
    });
    await saveEffectBench(db, { ...base(effect.id, owner.id), targetProfileId: profile.id, followsProfile: true });
    const following = (await getEffect(db, effect.id))!;
    expect(following.followsProfile).toBe(true);
    expect(following.document).toMatchObject({ canvas: { width: 64, height: 48 }, fixedPoint: { bits: 8, fraction: 6 }, columnGroup: 4 });
    await saveEffectBench(db, { ...base(effect.id, owner.id, 2), targetProfileId: profile.id, followsProfile: false });
    const detached = (await getEffect(db, effect.id))!;
    expect(detached).toMatchObject({ followsProfile: false, targetProfileId: profile.id });
    expect(detached.document).toMatchObject({ canvas: { width: 48, height: 40 }, fixedPoint: { bits: 16, fraction: 8 } });
  });

  it("refuses another project's sprite, another team's profile and key pixels outside the sprite, naming the field", async () => {
    const { owner, effect, sprite } = await setup();
    const other = await setup();
    const refused = async (patch: Partial<BenchSaveInput>) => {
      try {
        await saveEffectBench(db, { ...base(effect.id, owner.id), ...patch });
      } catch (error) {
        return error instanceof DomainError ? { field: error.field, message: error.message } : error;
      }
      return null;
    };
    expect(await refused({ spriteId: other.sprite.id })).toMatchObject({ field: "spriteId" });
    const profile = await makeTargetProfile(db, { team: other.team });
    expect(await refused({ targetProfileId: profile.id, followsProfile: true })).toMatchObject({ field: "targetProfileId" });
    expect(await refused({ spriteId: sprite.id, keyPixels: [[16, 0]] })).toMatchObject({
      field: "keyPixels",
      message: "Key pixel (16, 0) is outside the sprite: allowed x 0 to 15, y 0 to 15.",
    });
    expect((await getEffect(db, effect.id))!.version).toBe(1);
  });
});
