import { encodePng, parseEffect } from "@skewsmith/core";
import { afterAll, describe, expect, it } from "vitest";
import { makeEffect, makeProject, makeSprite, makeTeam, makeUser } from "../../tests/factories.ts";
import { testDb } from "../../tests/support/db.ts";
import { compassRose } from "../demo/art.ts";
import { getEffect, saveEffectBench } from "../models/effects.server.ts";
import { replaceSprite } from "../models/sprites.server.ts";
import { savedDiagnostics } from "./saved.server.ts";

const db = testDb();
afterAll(() => db.$client.end());

describe("savedDiagnostics", () => {
  it("answers again from what it measured, and measures anew after a save or a new picture", async () => {
    const owner = await makeUser(db);
    const team = await makeTeam(db, { owner });
    const project = await makeProject(db, { team, actor: owner });
    const sprite = await makeSprite(db, { project, actor: owner, image: compassRose(16) });
    const document = parseEffect({ canvas: { width: 40, height: 40 }, pivot: { x: 20, y: 20 }, angles: { list: [0, 30, 60] } });
    const effect = await makeEffect(db, { project, actor: owner, document, sprite });

    const first = await savedDiagnostics(db, (await getEffect(db, effect.id))!);
    expect(await savedDiagnostics(db, (await getEffect(db, effect.id))!)).toBe(first);

    // A bigger picture of the same sprite: more opaque pixels are counted.
    await replaceSprite(db, {
      projectId: project.id,
      spriteId: sprite.id,
      png: encodePng(compassRose(24)),
      actorId: owner.id,
      expectedVersion: sprite.version,
    });
    const replaced = await savedDiagnostics(db, (await getEffect(db, effect.id))!);
    expect(replaced).not.toBe(first);
    expect(replaced.content).toBeGreaterThan(first.content);

    // A saved change of the track: three frames become two.
    const saved = await saveEffectBench(db, {
      effectId: effect.id,
      expectedVersion: (await getEffect(db, effect.id))!.version,
      actorId: owner.id,
      document: { ...document, angles: { list: [0, 45] } },
      targetProfileId: null,
      followsProfile: false,
      spriteId: sprite.id,
      spriteX: null,
      spriteY: null,
      keyPixels: [],
    });
    expect(saved.ok).toBe(true);
    const after = await savedDiagnostics(db, (await getEffect(db, effect.id))!);
    expect(first.rows).toHaveLength(3);
    expect(after.rows).toHaveLength(2);
  });
});
