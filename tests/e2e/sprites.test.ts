/**
 * The sprite library and the frame downloads, as people use them: an editor uploads sprites by file input and by
 * drag-and-drop, previews, renames, replaces and deletes them; a viewer reads; frames come back as PNG files with the
 * same pixels as `skewsmith render`. Every person, team and project here is the test's own.
 */
import { encodePng, placeImage, type IndexedImage } from "@skewsmith/core";
import { eq } from "drizzle-orm";
import { readFileSync } from "node:fs";
import type { Browser, Page } from "playwright-core";
import sharp from "sharp";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { workdir } from "../../packages/core/test/helpers/cli.ts";
import { createDb } from "../../app/db/client.server.ts";
import { effects, type Project, type User } from "../../app/db/schema.ts";
import { compassRose } from "../../app/demo/art.ts";
import { getEffect } from "../../app/models/effects.server.ts";
import { listSprites } from "../../app/models/sprites.server.ts";
import { makeEffect, makeProject, makeSprite, makeTeam, makeUser, unique } from "../factories.ts";
import { chunk, ihdr, readIndexed, SIGNATURE } from "../support/pngSpec.ts";
import { appUrl, launch, screenshot, signInAs, sameOrigin } from "./support.ts";

const db = createDb(process.env.DATABASE_URL!, { max: 2 });
const cli = workdir();
let browser: Browser;
let editor: User;
let viewer: User;
let outsider: User;
let project: Project;
let emblemId: string;
let lanternId: string;

/** A 12 × 9 RGBA picture drawn by sharp (libvips), an outside encoder, with transparent and opaque pixels. */
const glassPixels = Buffer.from(
  Array.from({ length: 12 * 9 * 4 }, (_, i) => (i % 4 === 3 ? (Math.floor(i / 4) % 3 === 0 ? 0 : 255) : (i * 37 + 11) % 256)),
);
const glassPng = () =>
  sharp(glassPixels, { raw: { width: 12, height: 9, channels: 4 } })
    .png()
    .toBuffer();

/** The emblem's document: a 32 × 32 rose centred on a 40 × 36 canvas, eight frames of a full turn. */
const EMBLEM_DOC = { canvas: { width: 40, height: 36 }, pivot: { x: 20, y: 18 }, angles: { sweep: { from: 0, to: 360, frames: 8 } } };

beforeAll(async () => {
  browser = await launch();
  editor = await makeUser(db);
  viewer = await makeUser(db);
  outsider = await makeUser(db);
  const team = await makeTeam(db, {
    owner: await makeUser(db),
    members: [
      { user: editor, role: "editor" },
      { user: viewer, role: "viewer" },
    ],
  });
  await makeTeam(db, { owner: outsider });
  project = await makeProject(db, { team, actor: editor, name: `Harbour lights ${unique()}` });
  const rose = await makeSprite(db, { project, actor: editor, name: "rose.png", image: compassRose(32) });
  emblemId = (await makeEffect(db, { project, actor: editor, name: "Emblem", sprite: rose, document: EMBLEM_DOC })).id;
  lanternId = (await makeEffect(db, { project, actor: editor, name: "Lantern" })).id;
});
afterAll(async () => {
  await browser?.close();
  await db.$client.end();
  cli.remove();
});

const item = (page: Page, name: string) => page.getByTestId(`sprite-item-${name}`);
const detail = (page: Page) => page.getByTestId("sprite-detail");

describe("an editor's sprite library", () => {
  it("uploads with the file input and with drag-and-drop, previews, renames, replaces and deletes", async () => {
    const { context, page } = await signInAs(browser, editor, { viewport: { width: 1280, height: 900 } });
    await page.goto(`/projects/${project.id}`);

    // The file input: the browser reads the header first and says what it found.
    await page
      .getByLabel("PNG file", { exact: true })
      .setInputFiles({ name: "glass.png", mimeType: "image/png", buffer: await glassPng() });
    await expect.poll(() => page.getByTestId("sprite-file-facts").textContent()).toMatch(/glass\.png · 12 × 9 px · RGBA/);
    await page.getByRole("button", { name: "Upload sprite" }).click();
    await expect.poll(() => page.getByText("Added glass.png (12 × 9, RGBA).").count()).toBe(1);
    await expect.poll(() => detail(page).getByTestId("sprite-detail-name").textContent()).toBe("glass.png");

    // The preview: crisp (no smoothing), at a whole zoom, showing the very bytes uploaded.
    const preview = detail(page).getByTestId("sprite-preview");
    await expect.poll(() => preview.evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth)).toBe(12);
    expect(await preview.evaluate((img) => getComputedStyle(img).imageRendering)).toBe("pixelated");
    const shown = await preview.evaluate((img: HTMLImageElement) => [
      img.getBoundingClientRect().width,
      img.getBoundingClientRect().height,
    ]);
    expect(shown[0] / 12).toBe(shown[1] / 9);
    expect(Number.isInteger(shown[0] / 12)).toBe(true);
    const src = await preview.getAttribute("src");
    const served = await page.request.get(src!);
    const { data } = await sharp(await served.body())
      .ensureAlpha()
      .raw()
      .toBuffer({ resolveWithObject: true });
    expect(Buffer.compare(data, glassPixels)).toBe(0);

    // Drag-and-drop: an indexed rose dropped on the zone, under a name of the person's choosing.
    const rosePng = encodePng(compassRose(16));
    const transfer = await page.evaluateHandle(
      (bytes) => {
        const dt = new DataTransfer();
        dt.items.add(new File([new Uint8Array(bytes)], "dropped-rose.png", { type: "image/png" }));
        return dt;
      },
      [...rosePng],
    );
    const zone = page.getByTestId("sprite-file-zone");
    await zone.dispatchEvent("dragover", { dataTransfer: transfer });
    await zone.dispatchEvent("drop", { dataTransfer: transfer });
    await expect.poll(() => page.getByTestId("sprite-file-facts").textContent()).toMatch(/dropped-rose\.png · 16 × 16 px · indexed/);
    await page.getByLabel("Sprite name").fill("Small rose");
    await page.getByRole("button", { name: "Upload sprite" }).click();
    await expect.poll(() => item(page, "Small rose").count()).toBe(1);
    await expect.poll(() => detail(page).getByTestId("sprite-detail-name").textContent()).toBe("Small rose");
    await expect.poll(() => detail(page).getByRole("list", { name: "Palette of Small rose" }).getByRole("listitem").count()).toBe(6);
    const stored = (await listSprites(db, project.id)).find((s) => s.name === "Small rose")!;
    expect([stored.kind, stored.width, stored.byteSize]).toEqual(["indexed", 16, rosePng.length]);

    // What the browser refuses before sending, and what the server refuses when it is sent anyway.
    await page
      .getByLabel("PNG file", { exact: true })
      .setInputFiles({ name: "notes.txt", mimeType: "text/plain", buffer: Buffer.from("ship log") });
    await expect.poll(() => page.getByRole("alert").first().textContent()).toMatch(/^This is not a PNG file/);
    expect(await page.getByRole("button", { name: "Upload sprite" }).isDisabled()).toBe(true);
    const huge = Buffer.concat([SIGNATURE, chunk("IHDR", ihdr({ width: 8192, height: 8192 })), chunk("IEND", Buffer.alloc(0))]);
    await page.getByLabel("PNG file", { exact: true }).setInputFiles({ name: "huge.png", mimeType: "image/png", buffer: huge });
    await expect
      .poll(() => page.getByRole("alert").first().textContent())
      .toBe("The picture is 8192 × 8192 pixels; sprites can be at most 4096 × 4096 (the largest canvas).");
    const posted = await page.request.post(`/projects/${project.id}/sprites`, {
      headers: sameOrigin(),
      multipart: { intent: "upload-sprite", name: "", file: { name: "huge.png", mimeType: "image/png", buffer: huge } },
    });
    expect(posted.status()).toBe(400);
    expect(await posted.text()).toContain("sprites can be at most 4096 × 4096");
    const jpeg = await page.request.post(`/projects/${project.id}/sprites`, {
      headers: sameOrigin(),
      multipart: {
        intent: "upload-sprite",
        file: { name: "photo.jpg", mimeType: "image/jpeg", buffer: Buffer.from([0xff, 0xd8, 0xff, 0xe0, 0, 16]) },
      },
    });
    expect(jpeg.status()).toBe(400);
    expect(await jpeg.text()).toContain("it looks like a JPEG picture");
    await page.getByLabel("PNG file", { exact: true }).setInputFiles([]);
    // Hostile bodies get a 4xx with a reason, never a 500.
    const sprites = `/projects/${project.id}/sprites`;
    for (const [options, status, text] of [
      [{ data: { intent: "upload-sprite" } }, 415, "This address takes a form"],
      [{ form: { intent: "upload-sprite", file: "not a file" } }, 400, "Choose a PNG file first."],
      [
        { form: { intent: "rename-sprite", spriteId: "1; drop table sprites", version: "1", name: "x" } },
        400,
        "That sprite does not exist.",
      ],
      [{ form: { intent: "delete-sprite", spriteId: stored.id, version: "x" } }, 400, "reload the page"],
      [
        { form: { intent: "delete-sprite", spriteId: stored.id, version: "1", users: "a,b" } },
        400,
        "The list of effects in the form is damaged",
      ],
      [{ form: { intent: "rename-sprite", spriteId: stored.id, version: "1", name: "bad\u202ename" } }, 400, "bidirectional"],
      [{ form: { intent: "launch" } }, 400, "is not known here"],
    ] as const) {
      const response = await page.request.post(sprites, { ...options, headers: sameOrigin() });
      expect(response.status(), JSON.stringify(options)).toBe(status);
      expect(await response.text()).toContain(text);
    }

    // Rename, then a rename from a page that still shows the old version is refused.
    await item(page, "glass.png").click();
    await detail(page).locator("summary", { hasText: "Rename" }).click();
    await detail(page).getByLabel("New name").fill("sea-glass.png");
    await detail(page).getByRole("button", { name: "Save name" }).click();
    await expect.poll(() => item(page, "sea-glass.png").count()).toBe(1);
    await expect.poll(() => detail(page).getByText("Renamed the sprite to sea-glass.png.").count()).toBe(1);
    const glass = (await listSprites(db, project.id)).find((s) => s.name === "sea-glass.png")!;
    const stale = await page.request.post(`/projects/${project.id}/sprites`, {
      headers: sameOrigin(),
      form: { intent: "rename-sprite", spriteId: glass.id, version: "1", name: "late.png" },
    });
    expect(stale.status()).toBe(409);
    expect(await stale.text()).toContain("Someone changed sea-glass.png after you opened it (now version 2, you started from 1).");

    // Replace the picture: same sprite, new pixels; an effect using it keeps it.
    await db.update(effects).set({ spriteId: glass.id }).where(eq(effects.id, lanternId));
    await page.reload();
    await item(page, "sea-glass.png").click();
    await expect.poll(() => detail(page).getByTestId("sprite-used-by").textContent()).toBe("Lantern");
    await detail(page).locator("summary", { hasText: "Replace picture" }).click();
    await detail(page)
      .getByLabel("New PNG file")
      .setInputFiles({ name: "rose.png", mimeType: "image/png", buffer: Buffer.from(rosePng) });
    await detail(page).getByRole("button", { name: "Replace picture" }).click();
    await expect
      .poll(() =>
        detail(page)
          .getByText(/^Replaced the picture of sea-glass\.png \(now 16 × 16, 6 colours\)\. 1 effect uses it/)
          .count(),
      )
      .toBe(1);
    expect((await getEffect(db, lanternId))!.spriteId).toBe(glass.id);
    await screenshot(page, "sprites-editor-1280");

    // Delete: the confirmation names the effect that uses it, which is detached.
    await detail(page).locator("summary", { hasText: "Delete…" }).click();
    await expect
      .poll(() => detail(page).getByTestId("delete-sprite-warning").textContent())
      .toMatch(/^Lantern uses sea-glass\.png\. Deleting it detaches it/);
    await page.setViewportSize({ width: 1024, height: 900 });
    await screenshot(page, "sprites-editor-delete-1024");
    await detail(page).getByRole("button", { name: "Delete and detach" }).click();
    await expect
      .poll(() => page.getByText("Deleted sea-glass.png. Detached it from Lantern; that effect keeps its settings.").count())
      .toBe(1);
    await expect.poll(() => item(page, "sea-glass.png").count()).toBe(0);
    expect((await getEffect(db, lanternId))!.spriteId).toBeNull();
    expect((await getEffect(db, emblemId))!.spriteId).not.toBeNull();
    await context.close();
  });
});

describe("a viewer's sprite library", () => {
  it("shows the sprites and their previews but no way to change them, and a posted change gets 403", async () => {
    const { context, page } = await signInAs(browser, viewer, { viewport: { width: 1024, height: 900 } });
    await page.goto(`/projects/${project.id}/sprites`);
    await expect.poll(() => item(page, "rose.png").count()).toBe(1);
    await item(page, "rose.png").click();
    await expect.poll(() => detail(page).getByTestId("sprite-detail-name").textContent()).toBe("rose.png");
    expect(await page.getByLabel("PNG file", { exact: true }).count()).toBe(0);
    for (const text of ["Rename", "Replace picture", "Delete…"]) expect(await page.getByText(text, { exact: true }).count(), text).toBe(0);
    await screenshot(page, "sprites-viewer-1024");
    const rose = (await listSprites(db, project.id)).find((s) => s.name === "rose.png")!;
    const posted = await page.request.post(`/projects/${project.id}/sprites`, {
      headers: sameOrigin(),
      form: { intent: "rename-sprite", spriteId: rose.id, version: String(rose.version), name: "mine.png" },
    });
    expect(posted.status()).toBe(403);
    expect((await listSprites(db, project.id)).find((s) => s.id === rose.id)!.name).toBe("rose.png");
    await context.close();
  });
});

describe("frame downloads", () => {
  /** The emblem's canvas with the rose centred, placed here by plain arithmetic: (40 − 32) / 2 = 4, (36 − 32) / 2 = 2. */
  const placedRose = (): IndexedImage => placeImage(compassRose(32), 40, 36, 4, 2) as IndexedImage;

  it("gives a viewer each frame with the pixels of `skewsmith render`, indexed with the sprite's palette", async () => {
    const { context, page } = await signInAs(browser, viewer);
    cli.write("emblem.json", EMBLEM_DOC);
    cli.write("canvas.png", encodePng(placedRose()));
    for (const [frame, pass] of [
      [3, 3],
      [5, 1],
      [5, 2],
      [7, 3],
    ] as const) {
      const response = await page.request.get(`/effects/${emblemId}/frames/${frame}.png?pass=${pass}`);
      expect(response.status()).toBe(200);
      expect(response.headers()["content-type"]).toBe("image/png");
      expect(response.headers()["content-disposition"]).toBe(
        `inline; filename="emblem-frame-${frame}${pass === 3 ? "" : `-pass-${pass}`}.png"`,
      );
      const ours = new Uint8Array(await response.body());
      const run = await cli.run(
        "render",
        "emblem.json",
        "--image",
        "canvas.png",
        "--frame",
        String(frame),
        "--pass",
        String(pass),
        "--out",
        "out.png",
      );
      expect(run.code, run.stderr).toBe(0);
      const theirs = new Uint8Array(readFileSync(cli.path("out.png")));
      // Indices, by a reader written from the PNG specification; colours as sharp reads them.
      const file = readIndexed(ours);
      expect([...file.indices]).toEqual([...readIndexed(theirs).indices]);
      expect(file.plte).toEqual(compassRose(32).palette.map(([r, g, b]) => [r, g, b]));
      const rgba = async (png: Uint8Array) => (await sharp(png).ensureAlpha().raw().toBuffer()).toString("hex");
      expect(await rgba(ours)).toBe(await rgba(theirs));
    }
    // Pass 0 is the source placed in the canvas; the browser may keep it until the effect or sprite changes.
    const source = await page.request.get(`/effects/${emblemId}/frames/0.png?pass=0`);
    expect([...readIndexed(new Uint8Array(await source.body())).indices]).toEqual([...placedRose().data]);
    const again = await page.request.get(`/effects/${emblemId}/frames/0.png?pass=0`, {
      headers: { "If-None-Match": source.headers().etag },
    });
    expect(again.status()).toBe(304);
    await context.close();
  });

  it("answers a frame or pass out of range with 400 naming the allowed range", async () => {
    const { context, page } = await signInAs(browser, viewer);
    for (const bad of ["8.png", "-1.png", "01.png", "1.5.png", "frame.png", "3.gif"]) {
      const response = await page.request.get(`/effects/${emblemId}/frames/${bad}`);
      expect(response.status(), bad).toBe(400);
      expect(await response.text()).toContain("N a whole number from 0 to 7 (frames count from 0)");
    }
    for (const bad of ["4", "-1", "x", "1&pass=2"]) {
      const response = await page.request.get(`/effects/${emblemId}/frames/1.png?pass=${bad}`);
      expect(response.status(), bad).toBe(400);
      expect(await response.text()).toContain("allowed a whole number from 0 to 3 (0 the source placed in the canvas");
    }
    const sheet = await page.request.get(`/effects/${emblemId}/frames.png?zoom=9`);
    expect(sheet.status()).toBe(400);
    expect(await sheet.text()).toContain("zoom: “9” is not allowed; allowed a whole number from 1 to 8");
    await context.close();
  });

  it("gives a contact sheet of every frame, each cell the frame itself", async () => {
    const { context, page } = await signInAs(browser, viewer);
    const response = await page.request.get(`/effects/${emblemId}/frames.png?zoom=2`);
    expect(response.status()).toBe(200);
    // 8 frames of 40 × 36 at zoom 2: √(8 · 72 / 80) ≈ 2.7, so 3 columns and 3 rows, with 2-pixel gaps.
    expect(response.headers()["x-sheet-layout"]).toBe("frames=8; every=1; columns=3; rows=3");
    const sheet = await sharp(await response.body())
      .ensureAlpha()
      .raw()
      .toBuffer({ resolveWithObject: true });
    expect([sheet.info.width, sheet.info.height]).toEqual([3 * 80 + 4 * 2, 3 * 72 + 4 * 2]);
    const frame = await sharp(await (await page.request.get(`/effects/${emblemId}/frames/4.png`)).body())
      .ensureAlpha()
      .raw()
      .toBuffer();
    // Frame 4 is the second cell of the second row; each of its pixels covers 2 × 2 sheet pixels.
    const x0 = 2 + 1 * (80 + 2);
    const y0 = 2 + 1 * (72 + 2);
    for (let y = 0; y < 36; y++)
      for (let x = 0; x < 40; x++) {
        const want = frame.subarray((y * 40 + x) * 4, (y * 40 + x) * 4 + 4).toString("hex");
        const at = ((y0 + 2 * y + 1) * sheet.info.width + x0 + 2 * x + 1) * 4;
        if (sheet.data.subarray(at, at + 4).toString("hex") !== want) throw new Error(`sheet pixel for frame 4 (${x}, ${y}) differs`);
      }
    await context.close();
  });

  it("answers an outsider with 404 and sends a visitor who is not signed in to sign in", async () => {
    const { context, page } = await signInAs(browser, outsider);
    for (const path of [`/effects/${emblemId}/frames/0.png`, `/effects/${emblemId}/frames.png`, `/projects/${project.id}/sprites.json`]) {
      const response = await page.request.get(path);
      expect(response.status(), path).toBe(404);
    }
    await context.close();
    for (const path of [`/effects/${emblemId}/frames/0.png?pass=1`, `/effects/${emblemId}/frames.png`]) {
      const response = await fetch(`${appUrl()}${path}`, { redirect: "manual" });
      expect(response.status, path).toBe(302);
      expect(response.headers.get("location")).toBe(`/sign-in?next=${encodeURIComponent(path)}`);
    }
  });
});
