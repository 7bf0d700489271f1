import { encodePng, type IndexedImage, type RgbaImage } from "@skewsmith/core";
import { eq } from "drizzle-orm";
import sharp from "sharp";
import { afterAll, describe, expect, it } from "vitest";
import { makeEffect, makeProject, makeSprite, makeTargetProfile, makeTeam, makeUser } from "../../tests/factories.ts";
import { testDb } from "../../tests/support/db.ts";
import { chunk, ihdr, SIGNATURE } from "../../tests/support/pngSpec.ts";
import { effects, sprites } from "../db/schema.ts";
import { compassRose } from "../demo/art.ts";
import { spriteColours } from "../sprites/colours.ts";
import { deleteEffect, getEffect } from "./effects.server.ts";
import { DomainError } from "./errors.ts";
import { archiveProject } from "./projects.server.ts";
import {
  createSprite,
  deleteSprite,
  getSpriteFile,
  getSpriteImage,
  listSprites,
  renameSprite,
  replaceSprite,
  SPRITE_MAX_BYTES,
} from "./sprites.server.ts";

const db = testDb();
afterAll(() => db.$client.end());

async function setup() {
  const owner = await makeUser(db);
  const team = await makeTeam(db, { owner });
  const project = await makeProject(db, { team, actor: owner });
  return { owner, team, project };
}

/** The DomainError a promise rejects with (fails the test when it resolves or throws anything else). */
async function refusal(work: Promise<unknown>): Promise<DomainError> {
  const error = await work.then(
    () => null,
    (e: unknown) => e,
  );
  expect(error).toBeInstanceOf(DomainError);
  return error as DomainError;
}

const rgbaSquare = (size: number): RgbaImage => ({
  kind: "rgba",
  width: size,
  height: size,
  data: Uint8Array.from({ length: size * size * 4 }, (_, i) => (i % 4 === 3 ? (i % 8 === 3 ? 255 : 0) : (i * 29) % 256)),
});

describe("createSprite: limits and messages, nothing stored on a refusal", () => {
  it("refuses an oversize file, declared dimensions beyond 4096, a file that is not a PNG and a truncated one", async () => {
    const { owner, project } = await setup();
    const add = (png: Uint8Array) => createSprite(db, { projectId: project.id, name: `s-${Math.random()}`, png, actorId: owner.id });

    const oversize = new Uint8Array(SPRITE_MAX_BYTES + 1);
    oversize.set(encodePng(compassRose(8)));
    const big = await refusal(add(oversize));
    expect([big.field, big.status, big.message]).toEqual([
      "file",
      400,
      "The file is 4194305 bytes; sprites can be at most 4194304 bytes (4 MiB).",
    ]);

    const declared = Buffer.concat([
      SIGNATURE,
      chunk("IHDR", ihdr({ width: 5000, height: 10, colourType: 3 })),
      chunk("IDAT", Buffer.from([1, 2, 3])),
      chunk("IEND", Buffer.alloc(0)),
    ]);
    expect((await refusal(add(declared))).message).toBe(
      "The picture is 5000 × 10 pixels; sprites can be at most 4096 × 4096 (the largest canvas).",
    );

    const jpeg = Uint8Array.from([0xff, 0xd8, 0xff, 0xe0, 0x00, 0x10, 0x4a, 0x46, 0x49, 0x46]);
    expect((await refusal(add(jpeg))).message).toMatch(/^This is not a PNG file: it looks like a JPEG picture/);

    const whole = encodePng(compassRose(16));
    expect((await refusal(add(whole.subarray(0, whole.length - 20)))).message).toMatch(/cut short/);

    expect(await listSprites(db, project.id)).toEqual([]);
  });

  it("refuses a second sprite of the same name in a project, whatever its case, but allows it in another project", async () => {
    const { owner, team, project } = await setup();
    await makeSprite(db, { project, actor: owner, name: "Hero.png" });
    const clash = await refusal(makeSprite(db, { project, actor: owner, name: "hero.PNG" }));
    expect([clash.field, clash.status, clash.message]).toEqual([
      "name",
      409,
      "The project already has a sprite called “hero.PNG”. Choose another name.",
    ]);
    const other = await makeProject(db, { team, actor: owner });
    await expect(makeSprite(db, { project: other, actor: owner, name: "hero.png" })).resolves.toMatchObject({ name: "hero.png" });
  });

  it("refuses changes in an archived project", async () => {
    const { owner, project } = await setup();
    await archiveProject(db, { projectId: project.id, actorId: owner.id });
    expect((await refusal(makeSprite(db, { project, actor: owner }))).status).toBe(409);
  });
});

describe("round trips through PostgreSQL", () => {
  it("keeps an indexed sprite's indices and palette exactly, with kind, size and byte count", async () => {
    const { owner, project } = await setup();
    const rose = compassRose(32);
    const png = encodePng(rose);
    const sprite = await makeSprite(db, { project, actor: owner, name: "rose.png", png });
    expect([sprite.kind, sprite.width, sprite.height, sprite.byteSize, sprite.version]).toEqual(["indexed", 32, 32, png.length, 1]);
    const file = await getSpriteFile(db, sprite.id);
    expect(Buffer.compare(file!.png, Buffer.from(png))).toBe(0);
    const { image } = (await getSpriteImage(db, sprite.id))!;
    const back = image as IndexedImage;
    expect(back.kind).toBe("indexed");
    expect([...back.data]).toEqual([...rose.data]);
    expect(back.palette).toEqual(rose.palette);
    const [listed] = await listSprites(db, project.id);
    expect(listed).toMatchObject({ name: "rose.png", kind: "indexed", colours: rose.palette.length, byteSize: png.length });
    expect(listed.palette).toEqual(rose.palette);
  });

  it("keeps an RGBA sprite's pixels exactly (written by sharp, an outside encoder), with an empty palette", async () => {
    const { owner, project } = await setup();
    const square = rgbaSquare(6);
    const png = await sharp(Buffer.from(square.data), { raw: { width: 6, height: 6, channels: 4 } })
      .png()
      .toBuffer();
    const sprite = await makeSprite(db, { project, actor: owner, name: "glass.png", png });
    expect([sprite.kind, sprite.width, sprite.height, sprite.palette]).toEqual(["rgba", 6, 6, []]);
    const { image } = (await getSpriteImage(db, sprite.id))!;
    expect(image.kind).toBe("rgba");
    expect([...image.data]).toEqual([...square.data]);
    // …and sharp reads the stored bytes the same way.
    const { data } = await sharp((await getSpriteFile(db, sprite.id))!.png)
      .ensureAlpha()
      .raw()
      .toBuffer({ resolveWithObject: true });
    expect([...data]).toEqual([...square.data]);
  });
});

describe("renameSprite", () => {
  it("renames at the current version and bumps it; a stale version is refused with 409 and nothing changes", async () => {
    const { owner, project } = await setup();
    const sprite = await makeSprite(db, { project, actor: owner, name: "old.png" });
    const renamed = await renameSprite(db, {
      projectId: project.id,
      spriteId: sprite.id,
      name: "new.png",
      expectedVersion: 1,
      actorId: owner.id,
    });
    expect([renamed.name, renamed.version]).toEqual(["new.png", 2]);
    const stale = await refusal(
      renameSprite(db, { projectId: project.id, spriteId: sprite.id, name: "other.png", expectedVersion: 1, actorId: owner.id }),
    );
    expect(stale.status).toBe(409);
    expect(stale.message).toBe(
      "Someone changed new.png after you opened it (now version 2, you started from 1). Reload to see their change, then try again.",
    );
    expect((await getSpriteFile(db, sprite.id))!.name).toBe("new.png");
  });

  it("lets exactly one of two renames from the same version through", async () => {
    const { owner, project } = await setup();
    const sprite = await makeSprite(db, { project, actor: owner });
    const tries = ["a.png", "b.png"].map((name) =>
      renameSprite(db, { projectId: project.id, spriteId: sprite.id, name, expectedVersion: 1, actorId: owner.id }),
    );
    const results = await Promise.allSettled(tries);
    expect(results.filter((r) => r.status === "fulfilled")).toHaveLength(1);
    const failed = results.find((r) => r.status === "rejected") as PromiseRejectedResult;
    expect((failed.reason as DomainError).status).toBe(409);
    expect((await getSpriteFile(db, sprite.id))!.version).toBe(2);
  });

  it("answers 404 for a sprite of another project, even with the right version", async () => {
    const { owner, team, project } = await setup();
    const other = await makeProject(db, { team, actor: owner });
    const sprite = await makeSprite(db, { project: other, actor: owner });
    const wrong = await refusal(
      renameSprite(db, { projectId: project.id, spriteId: sprite.id, name: "x.png", expectedVersion: 1, actorId: owner.id }),
    );
    expect(wrong.status).toBe(404);
  });

  it("refuses a name another sprite of the project has (409 on the name field)", async () => {
    const { owner, project } = await setup();
    await makeSprite(db, { project, actor: owner, name: "taken.png" });
    const sprite = await makeSprite(db, { project, actor: owner, name: "mine.png" });
    const clash = await refusal(
      renameSprite(db, { projectId: project.id, spriteId: sprite.id, name: "TAKEN.png", expectedVersion: 1, actorId: owner.id }),
    );
    expect([clash.field, clash.status]).toEqual(["name", 409]);
  });
});

describe("replaceSprite", () => {
  it("keeps the id, so an effect using it turns the new picture; the version goes up and a stale one is refused", async () => {
    const { owner, project } = await setup();
    const sprite = await makeSprite(db, { project, actor: owner, image: compassRose(16) });
    const effect = await makeEffect(db, {
      project,
      actor: owner,
      sprite,
      document: { canvas: { width: 32, height: 32 }, pivot: { x: 16, y: 16 }, angles: { list: [0, 45] } },
    });
    const png = encodePng(rgbaSquare(16));
    const { sprite: after, notes } = await replaceSprite(db, {
      projectId: project.id,
      spriteId: sprite.id,
      png,
      expectedVersion: 1,
      actorId: owner.id,
    });
    expect([after.id, after.name, after.kind, after.version, after.byteSize]).toEqual([sprite.id, sprite.name, "rgba", 2, png.length]);
    expect(notes[0]).toBe(`1 effect uses it and now turns the new picture: ${effect.name}.`);
    expect((await getEffect(db, effect.id))!.spriteId).toBe(sprite.id);
    const { image } = (await getSpriteImage(db, sprite.id))!;
    expect([...image.data]).toEqual([...rgbaSquare(16).data]);

    const stale = await refusal(
      replaceSprite(db, { projectId: project.id, spriteId: sprite.id, png, expectedVersion: 1, actorId: owner.id }),
    );
    expect(stale.status).toBe(409);
  });

  it("refuses a new size that no longer fits an effect's canvas where the effect places it, naming the effect", async () => {
    const { owner, project } = await setup();
    const sprite = await makeSprite(db, { project, actor: owner, image: compassRose(16) });
    const doc = (w: number, h: number) => ({ canvas: { width: w, height: h }, pivot: { x: w / 2, y: h / 2 }, angles: { list: [0] } });
    const snug = await makeEffect(db, { project, actor: owner, name: "Snug", sprite, document: doc(24, 24) });
    // Placed at (8, 8) on 24 × 24: a 16 × 16 picture ends at 24, a 20 × 20 one would stick out.
    await makeEffect(db, { project, actor: owner, name: "Placed", sprite, spriteX: 8, spriteY: 8, document: doc(24, 24) });
    const bigger = encodePng(compassRose(20));
    const refused = await refusal(
      replaceSprite(db, { projectId: project.id, spriteId: sprite.id, png: bigger, expectedVersion: 1, actorId: owner.id }),
    );
    expect([refused.status, refused.field]).toEqual([409, "file"]);
    expect(refused.message).toBe(
      "The new picture is 20 × 20 pixels and would no longer fit inside the canvas of Placed (24 × 24, sprite at 8, 8). Grow that canvas or move the sprite first, or upload the picture as a new sprite.",
    );
    expect((await getSpriteFile(db, sprite.id))!.version).toBe(1);
    // Centred on Snug's 24 × 24 canvas a 20 × 20 picture sits at (2, 2) and fits; once Placed moves to (2, 2) it fits too.
    await db.update(effects).set({ spriteX: 2, spriteY: 2 }).where(eq(effects.name, "Placed"));
    const ok = await replaceSprite(db, { projectId: project.id, spriteId: sprite.id, png: bigger, expectedVersion: 1, actorId: owner.id });
    expect(ok.sprite.width).toBe(20);
    expect(ok.notes).toContain("Effects that centre the sprite centre the new size (1 of 2).");
    expect((await getEffect(db, snug.id))!.spriteId).toBe(sprite.id);
  });

  it("drops key pixels outside a smaller picture, says so and bumps that effect's version", async () => {
    const { owner, project } = await setup();
    const sprite = await makeSprite(db, { project, actor: owner, image: compassRose(16) });
    const effect = await makeEffect(db, { project, actor: owner, name: "Keys", sprite });
    await db
      .update(effects)
      .set({
        keyPixels: [
          [1, 1],
          [7, 7],
          [12, 3],
          [15, 15],
        ],
      })
      .where(eq(effects.id, effect.id));
    const { notes } = await replaceSprite(db, {
      projectId: project.id,
      spriteId: sprite.id,
      png: encodePng(compassRose(8)),
      expectedVersion: 1,
      actorId: owner.id,
    });
    expect(notes).toContain("Keys lost 2 key pixels that lay outside the new picture.");
    const after = (await getEffect(db, effect.id))!;
    expect(after.keyPixels).toEqual([
      [1, 1],
      [7, 7],
    ]);
    expect(after.version).toBe(effect.version + 1);
  });

  it("refuses a broken file on the file field and keeps the old picture", async () => {
    const { owner, project } = await setup();
    const sprite = await makeSprite(db, { project, actor: owner });
    const before = (await getSpriteFile(db, sprite.id))!.png;
    const bad = await refusal(
      replaceSprite(db, {
        projectId: project.id,
        spriteId: sprite.id,
        png: new TextEncoder().encode("GIF89a"),
        expectedVersion: 1,
        actorId: owner.id,
      }),
    );
    expect([bad.field, bad.message]).toEqual(["file", expect.stringMatching(/looks like a GIF picture/)]);
    expect(Buffer.compare((await getSpriteFile(db, sprite.id))!.png, before)).toBe(0);
  });
});

describe("deleteSprite", () => {
  it("detaches it from every effect that uses it (deleted ones too), moving key pixels onto the canvas", async () => {
    const { owner, project } = await setup();
    const sprite = await makeSprite(db, { project, actor: owner, image: compassRose(16) });
    const doc = { canvas: { width: 32, height: 32 }, pivot: { x: 16, y: 16 }, angles: { list: [0] } };
    const a = await makeEffect(db, { project, actor: owner, name: "A", sprite, document: doc });
    const b = await makeEffect(db, { project, actor: owner, name: "B", sprite, document: doc, spriteX: 20, spriteY: 0 });
    await db
      .update(effects)
      .set({ keyPixels: [[1, 2]] })
      .where(eq(effects.id, a.id));
    await db
      .update(effects)
      .set({
        keyPixels: [
          [3, 4],
          [14, 0],
        ],
      })
      .where(eq(effects.id, b.id));
    await deleteEffect(db, { effectId: b.id, actorId: owner.id });
    const [listed] = await listSprites(db, project.id);
    expect(listed.usedBy).toEqual([
      { id: a.id, name: "A", deleted: false },
      { id: b.id, name: "B", deleted: true },
    ]);

    const { detached } = await deleteSprite(db, {
      projectId: project.id,
      spriteId: sprite.id,
      expectedVersion: 1,
      expectedUsers: [a.id, b.id],
      actorId: owner.id,
    });
    expect(detached).toEqual(["A", "B"]);
    expect(await getSpriteFile(db, sprite.id)).toBeNull();
    const afterA = (await getEffect(db, a.id))!;
    const afterB = (await getEffect(db, b.id))!;
    // A centred the 16 × 16 sprite at (8, 8); B placed it at (20, 0), so (14, 0) lands at x 34, off the 32-wide canvas.
    expect([afterA.spriteId, afterA.keyPixels, afterA.version]).toEqual([null, [[9, 10]], a.version + 1]);
    expect([afterB.spriteId, afterB.spriteX, afterB.keyPixels]).toEqual([null, null, [[23, 4]]]);
    expect(afterA.document).toEqual(a.document);
  });

  it("refuses (409, nothing deleted) when an effect started using it after the person was shown the list, or at a stale version", async () => {
    const { owner, project } = await setup();
    const sprite = await makeSprite(db, { project, actor: owner });
    await makeEffect(db, { project, actor: owner, name: "Newcomer", sprite });
    const unseen = await refusal(
      deleteSprite(db, { projectId: project.id, spriteId: sprite.id, expectedVersion: 1, expectedUsers: [], actorId: owner.id }),
    );
    expect(unseen.status).toBe(409);
    expect(unseen.message).toMatch(/^Since you opened this, Newcomer started using /);
    const stale = await refusal(
      deleteSprite(db, { projectId: project.id, spriteId: sprite.id, expectedVersion: 7, expectedUsers: [], actorId: owner.id }),
    );
    expect(stale.status).toBe(409);
    expect(await db.select().from(sprites).where(eq(sprites.id, sprite.id))).toHaveLength(1);
  });

  it("refuses (409, nothing changed) a new picture with more colours than the target profile of an effect using it allows", async () => {
    const { owner, team, project } = await setup();
    const profile = await makeTargetProfile(db, { team, actor: owner, name: "Three shades", maxColours: 3 });
    // The effect starts within the limit (a new effect must): three colours, the background included.
    const three: IndexedImage = {
      kind: "indexed",
      width: 3,
      height: 1,
      data: new Uint8Array([0, 1, 2]),
      palette: [
        [0, 0, 0, 0],
        [255, 255, 255, 255],
        [20, 28, 44, 255],
      ],
    };
    const sprite = await makeSprite(db, { project, actor: owner, image: three });
    await makeEffect(db, { project, actor: owner, name: "Title spin", sprite, targetProfile: profile });
    const rose = compassRose(32);
    const colours = spriteColours(rose);
    expect(colours).toBeGreaterThan(3); // the case needs a picture over the limit
    const refused = await refusal(
      replaceSprite(db, { projectId: project.id, spriteId: sprite.id, png: encodePng(rose), expectedVersion: 1, actorId: owner.id }),
    );
    expect([refused.status, refused.field]).toEqual([409, "file"]);
    expect(refused.message).toBe(
      `The new picture of ${sprite.name} uses ${colours} colours (the background included); Title spin is made for the target profile Three shades, which allows at most 3. Reduce its colours, or raise the profile's limit.`,
    );
    const [kept] = await db.select().from(sprites).where(eq(sprites.id, sprite.id));
    expect(kept.version).toBe(1);

    // Two colours (the background and white) fit the limit.
    const two: IndexedImage = {
      kind: "indexed",
      width: 2,
      height: 1,
      data: new Uint8Array([0, 1]),
      palette: [
        [0, 0, 0, 0],
        [255, 255, 255, 255],
      ],
    };
    const { sprite: after } = await replaceSprite(db, {
      projectId: project.id,
      spriteId: sprite.id,
      png: encodePng(two),
      expectedVersion: 1,
      actorId: owner.id,
    });
    expect(after.version).toBe(2);
  });
});
