import { decodePng, type IndexedImage } from "@skewsmith/core";
import { eq } from "drizzle-orm";
import { readFileSync } from "node:fs";
import type { Page } from "playwright-core";
import { describe, expect, it } from "vitest";
import { effects } from "../../app/db/schema.ts";
import { benchWorld, bufferSize, canvasPixels, waitForTable } from "./benchWorld.ts";
import { screenshot, signInAs, sameOrigin, browserAndDb } from "./support.ts";

const e2e = browserAndDb();
const { db } = e2e;

const ROSE_EFFECT = {
  canvas: { width: 20, height: 18 },
  pivot: { x: 10, y: 9 },
  angles: { sweep: { from: 0, to: 360, frames: 24 } },
};

const saved = async (id: string) => (await db.select().from(effects).where(eq(effects.id, id)))[0];
const search = (page: Page) => new URL(page.url()).searchParams;

/** Replaces the text of the angle-list editor (CodeMirror) as a person would: select everything, type. */
async function typeAngles(page: Page, text: string) {
  const editor = page.getByRole("textbox", { name: /Angles in degrees/ });
  await editor.click();
  await page.keyboard.press("Control+A");
  await page.keyboard.press("Delete");
  await page.keyboard.insertText(text);
}

describe("the effect bench, for an editor", () => {
  it("places a sprite, changes the angle track, steps frames and passes, sees the table change, and saves", async () => {
    const world = await benchWorld(db, ROSE_EFFECT);
    const { context, page } = await signInAs(e2e.browser, world.editor, { viewport: { width: 1280, height: 800 } });
    await page.goto(`/effects/${world.effect.id}`);
    await waitForTable(page, 24);
    // Without a sprite the table measures every canvas pixel, and the preview starts paused on frame 0, pass 3.
    await expect.poll(() => page.locator("#frame-table-heading").textContent()).toContain("all 360 canvas pixels");
    expect(await page.getByRole("button", { name: "Play" }).getAttribute("aria-pressed")).toBe("false");
    // The address gains the view once the page has hydrated: wait for it rather than read it once.
    await expect.poll(() => search(page).get("zoom")).toMatch(/^[1-9]\d*$/);
    const zoom = Number(search(page).get("zoom"));
    await expect.poll(() => bufferSize(page)).toEqual([20 * zoom, 18 * zoom]);
    expect(await page.getByTestId("photosensitivity-caution").textContent()).toContain("photosensitive epilepsy");

    // Attach the sprite and place it two pixels from the left edge.
    await page.getByLabel("Attached sprite").selectOption(world.sprite.id);
    await page.getByLabel("Left edge x").fill("2");
    await expect.poll(() => page.locator("#frame-table-heading").textContent()).toMatch(/over the sprite's \d+ opaque pixels/);
    const before = await page.getByTestId("frame-table").locator("tbody tr").nth(5).textContent();

    // A list track with a bad line: core's message on that line; the preview keeps the last valid settings.
    await page.getByLabel("List, one angle per line").check();
    await typeAngles(page, "0\n30\nabout 60\n90");
    await expect
      .poll(() => page.getByTestId("angle-list-errors").textContent())
      .toBe('Line 3: "about 60" is not allowed; allowed a finite number of degrees');
    await expect.poll(() => page.locator(".cm-lintRange-error").count()).toBe(1);
    expect(await page.getByRole("button", { name: /^Save version/ }).isDisabled()).toBe(true);
    await typeAngles(page, "0\n30\n60\n90\n135");
    await waitForTable(page, 5);
    expect(await page.getByTestId("frame-table").locator("tbody tr").nth(4).textContent()).toContain("135°");
    expect(await page.getByTestId("frame-table").locator("tbody tr").nth(4).textContent()).toContain("yes, then -45°");
    expect(before).not.toBe(await page.getByTestId("frame-table").locator("tbody tr").nth(4).textContent());

    // Step frames and passes: the address follows (replaced, not pushed).
    const history = await page.evaluate(() => window.history.length);
    await page.getByRole("button", { name: "Next frame" }).click();
    await page.getByRole("button", { name: "Next frame" }).click();
    await expect.poll(() => search(page).get("frame")).toBe("2");
    await page.getByRole("radio", { name: /^Pass 1:/ }).check({ force: true });
    await expect.poll(() => search(page).get("pass")).toBe("1");
    await page.getByRole("radio", { name: /^Pass 0:/ }).check({ force: true });
    await expect.poll(() => search(page).get("pass")).toBe("0");
    expect(await page.evaluate(() => window.history.length)).toBe(history);
    // The keyboard on the preview: → steps a frame, ↑ a pass.
    await page.getByRole("img", { name: "Frame preview" }).focus();
    await page.keyboard.press("ArrowRight");
    await page.keyboard.press("ArrowUp");
    await expect.poll(() => [search(page).get("frame"), search(page).get("pass")]).toEqual(["3", "1"]);
    // A row of the table jumps there.
    await page.getByRole("button", { name: "Go to frame 4" }).click();
    await expect.poll(() => page.getByTestId("frame-number").textContent()).toBe("4 / 4");

    // Overlays on: the legend explains them.
    await page.getByRole("radio", { name: /^Pass 3:/ }).check({ force: true });
    await page.getByLabel("Error shading").check();
    await page.getByLabel("Ideal turn").check();
    await expect.poll(() => page.getByTestId("error-legend").textContent()).toContain("1 px or more");
    await screenshot(page, "bench-editor-1280");

    await page.getByRole("button", { name: "Save version 2" }).click();
    await expect.poll(() => page.getByTestId("save-state").textContent()).toBe("Saved version 2.");
    const row = await saved(world.effect.id);
    expect(row).toMatchObject({ version: 2, spriteId: world.sprite.id, spriteX: 2, spriteY: null });
    expect(row.document.angles).toEqual({ list: [0, 30, 60, 90, 135] });

    await page.setViewportSize({ width: 1024, height: 768 });
    await screenshot(page, "bench-editor-1024");
    await context.close();
  });

  it("opens a deep link at its frame, pass and zoom, and downloads that frame as the frame route draws it", async () => {
    const world = await benchWorld(db, ROSE_EFFECT, { sprite: true });
    const { context, page } = await signInAs(e2e.browser, world.editor);
    await page.goto(`/effects/${world.effect.id}?frame=7&pass=2&zoom=3`);
    await waitForTable(page, 24);
    await expect.poll(() => page.getByLabel("Frame", { exact: true }).inputValue()).toBe("7");
    await expect.poll(() => page.getByRole("radio", { name: /^Pass 2:/ }).isChecked()).toBe(true);
    await expect.poll(() => bufferSize(page)).toEqual([60, 54]);
    await expect.poll(() => page.getByRole("row", { name: /Go to frame 7/ }).getAttribute("aria-current")).toBe("true");
    await expect.poll(() => [search(page).get("frame"), search(page).get("pass"), search(page).get("zoom")]).toEqual(["7", "2", "3"]);

    // The bench's download button saves frame 7 after pass 2: the frame route's PNG, byte for byte, indexed with the
    // sprite's palette; and the preview (drawn by the browser's worker) shows those pixels, each as a 3 × 3 block.
    const [download] = await Promise.all([
      page.waitForEvent("download"),
      page.getByRole("link", { name: "Download this frame (PNG)" }).click(),
    ]);
    const downloaded = new Uint8Array(readFileSync((await download.path())!));
    const route = await page.request.get(`/effects/${world.effect.id}/frames/7.png?pass=2`);
    expect(route.status()).toBe(200);
    expect(Buffer.from(downloaded).equals(await route.body())).toBe(true);
    const frame = decodePng(downloaded);
    if (frame.kind !== "indexed") throw new Error("the frame of an indexed sprite must be an indexed PNG");
    expect([frame.width, frame.height]).toEqual([20, 18]);
    expect(frame.palette).toEqual(world.image.palette);
    const want = Array.from(frame.data, (i) => frame.palette[i]);
    // Pass 2 of a 105° turn moved pixels: the frame is not the placed source (so the comparison below can fail).
    const source = decodePng(new Uint8Array(await (await page.request.get(`/effects/${world.effect.id}/frames/7.png?pass=0`)).body()));
    expect(Array.from((source as IndexedImage).data)).not.toEqual(Array.from(frame.data));
    const sampled = async () => {
      const rgba = await canvasPixels(page);
      const out: number[][] = [];
      for (let y = 0; y < 18; y++)
        for (let x = 0; x < 20; x++)
          out.push(Array.from(rgba.slice(((y * 3 + 1) * 60 + x * 3 + 1) * 4, ((y * 3 + 1) * 60 + x * 3 + 1) * 4 + 4)));
      return JSON.stringify(out);
    };
    await expect.poll(sampled).toBe(JSON.stringify(want));

    // Nonsense in the address falls back to the defaults, never an error.
    const bad = await page.goto(`/effects/${world.effect.id}?frame=999&pass=9&zoom=-1`);
    expect(bad?.status()).toBe(200);
    await expect.poll(() => page.getByLabel("Frame", { exact: true }).inputValue()).toBe("0");
    await context.close();
  });

  it("keeps unsaved edits across a reload and says so", async () => {
    const world = await benchWorld(db, ROSE_EFFECT, { sprite: true });
    const { context, page } = await signInAs(e2e.browser, world.editor);
    await page.goto(`/effects/${world.effect.id}`);
    await waitForTable(page, 24);
    await page.getByLabel("Pivot x").fill("9.5");
    await expect.poll(() => page.getByTestId("save-state").textContent()).toBe("Unsaved edits on version 1");
    // Leaving by a link inside the app asks first.
    await page.getByRole("link", { name: world.project.name }).first().click();
    await expect.poll(() => page.getByRole("dialog", { name: "Leave the bench with unsaved edits?" }).isVisible()).toBe(true);
    await page.getByRole("button", { name: "Stay on the bench" }).click();
    expect(new URL(page.url()).pathname).toBe(`/effects/${world.effect.id}`);
    // Leaving the page itself (a reload) gets the browser's own warning: a beforeunload dialog, accepted here.
    const dialogs: string[] = [];
    page.on("dialog", (d) => {
      dialogs.push(d.type());
      void d.accept();
    });
    await page.reload();
    expect(dialogs).toEqual(["beforeunload"]);
    await expect.poll(() => page.getByTestId("restored-notice").count()).toBe(1);
    await expect.poll(() => page.getByLabel("Pivot x").inputValue()).toBe("9.5");
    await expect.poll(() => page.getByTestId("save-state").textContent()).toBe("Unsaved edits on version 1");
    expect((await saved(world.effect.id)).version).toBe(1);
    // Once the edits are dropped there is nothing to warn about: a reload goes without a dialog, and no draft comes back.
    await page.getByRole("button", { name: "Undo my edits" }).click();
    await expect.poll(() => page.getByTestId("save-state").textContent()).toBe("No unsaved edits");
    await page.reload();
    await expect.poll(() => page.getByLabel("Pivot x").inputValue()).toBe("10");
    expect(await page.getByTestId("restored-notice").count()).toBe(0);
    expect(dialogs).toEqual(["beforeunload"]);
    await context.close();
  });

  it("refuses a stale save, shows what the other person changed, keeps my edits, and merges on request", async () => {
    const world = await benchWorld(db, ROSE_EFFECT, { sprite: true });
    const mine = await signInAs(e2e.browser, world.editor);
    const theirs = await signInAs(e2e.browser, world.other);
    for (const p of [mine.page, theirs.page]) {
      await p.goto(`/effects/${world.effect.id}`);
      await waitForTable(p, 24);
    }
    await theirs.page.getByLabel("Rounding").selectOption("floor");
    await theirs.page.getByRole("button", { name: "Save version 2" }).click();
    await expect.poll(() => theirs.page.getByTestId("save-state").textContent()).toBe("Saved version 2.");

    await mine.page.getByLabel("Pivot y").fill("8.5");
    await mine.page.getByRole("button", { name: "Save version 2" }).click();
    const conflict = mine.page.getByTestId("conflict");
    await expect.poll(() => conflict.count()).toBe(1);
    expect(await mine.page.getByTestId("conflict-changes").textContent()).toMatch(/Rounding\s*nearest-away\s*floor/);
    expect(await conflict.textContent()).toContain(world.other.name!);
    expect(await mine.page.getByLabel("Pivot y").inputValue()).toBe("8.5");
    expect((await saved(world.effect.id)).document).toMatchObject({ rounding: "floor", pivot: { x: 10, y: 9 } });
    await screenshot(mine.page, "bench-conflict");

    await mine.page.getByRole("button", { name: "Keep my edits on top of theirs" }).click();
    expect(await mine.page.getByLabel("Rounding").inputValue()).toBe("floor");
    await mine.page.getByRole("button", { name: "Save version 3" }).click();
    await expect.poll(() => mine.page.getByTestId("save-state").textContent()).toBe("Saved version 3.");
    expect((await saved(world.effect.id)).document).toMatchObject({ rounding: "floor", pivot: { x: 10, y: 8.5 } });
    await mine.context.close();
    await theirs.context.close();
  });
});

describe("the effect bench, for a viewer", () => {
  it("shows everything read-only and refuses a save", async () => {
    const world = await benchWorld(db, ROSE_EFFECT, { sprite: true });
    const { context, page } = await signInAs(e2e.browser, world.viewer, { viewport: { width: 1280, height: 800 } });
    await page.goto(`/effects/${world.effect.id}`);
    await waitForTable(page, 24);
    expect(await page.getByTestId("read-only-notice").count()).toBe(1);
    expect(await page.getByRole("button", { name: /^Save version/ }).count()).toBe(0);
    expect(await page.getByRole("button", { name: "Place the pivot on the preview" }).count()).toBe(0);
    expect(await page.getByLabel("Pivot x").getAttribute("readonly")).not.toBeNull();
    expect(await page.getByLabel("Rounding").isDisabled()).toBe(true);
    expect(await page.getByLabel("Attached sprite").isDisabled()).toBe(true);
    // Looking is allowed: step, change pass, and the export files.
    await page.getByRole("button", { name: "Next frame" }).click();
    await expect.poll(() => search(page).get("frame")).toBe("1");
    await expect.poll(() => page.getByTestId("code-view").count()).toBe(1);
    await screenshot(page, "bench-viewer-1280");
    const post = await page.request.post(`/effects/${world.effect.id}`, { headers: sameOrigin(), form: { intent: "save", version: "1" } });
    expect(post.status()).toBe(403);
    expect((await saved(world.effect.id)).version).toBe(1);
    await context.close();
  });
});
