/**
 * The bench's key pixels, its reduced-motion playback and a long track's export, in Chromium. Every reading polls:
 * the page hydrates and the worker answers asynchronously.
 */
import { compileTables, renderImage, type IndexedImage } from "@skewsmith/core";
import { eq } from "drizzle-orm";
import type { Page } from "playwright-core";
import { describe, expect, it } from "vitest";
import { effects } from "../../app/db/schema.ts";
import { benchWorld, waitForTable } from "./benchWorld.ts";
import { screenshot, signInAs, browserAndDb } from "./support.ts";

const e2e = browserAndDb();
const { db } = e2e;

const saved = async (id: string) => (await db.select().from(effects).where(eq(effects.id, id)))[0];
const tableRows = (page: Page) =>
  page
    .getByTestId("frame-table")
    .locator("tbody tr")
    .evaluateAll((trs) => trs.map((tr) => Array.from(tr.querySelectorAll("td"), (td) => td.textContent!.trim())));

describe("key pixels", () => {
  it("are marked by clicking the source, unmarked by a second click, followed on every frame in the table, and saved", async () => {
    const effectDoc = { canvas: { width: 20, height: 18 }, pivot: { x: 10, y: 9 }, angles: { sweep: { from: 0, to: 360, frames: 24 } } };
    const world = await benchWorld(db, effectDoc, { sprite: true });
    const { context, page } = await signInAs(e2e.browser, world.editor, { viewport: { width: 1280, height: 800 } });
    await page.goto(`/effects/${world.effect.id}?frame=5&pass=3&zoom=8`);
    await waitForTable(page, 24);
    await expect.poll(() => page.getByTestId("key-pixel-count").textContent()).toMatch(/^None marked/);
    await expect
      .poll(async () => (await page.getByTestId("frame-table").locator("thead th").allTextContents()).join("|"))
      .not.toContain("Key");

    // Marking goes to the source pass; the 16 × 16 sprite sits at (2, 1) in the 20 × 18 canvas (centred).
    await page.getByRole("button", { name: "Mark key pixels on the source" }).click();
    await expect.poll(() => page.getByRole("radio", { name: /^Pass 0:/ }).isChecked()).toBe(true);
    await expect.poll(() => page.getByRole("checkbox", { name: "Key pixels", exact: true }).isChecked()).toBe(true);
    const preview = page.getByRole("img", { name: "Frame preview" });
    const click = (x: number, y: number) => preview.click({ position: { x: (x + 0.5) * 8, y: (y + 0.5) * 8 } });
    await click(10, 9);
    await click(11, 9);
    await click(4, 3);
    await expect.poll(() => page.getByTestId("key-pixel-count").textContent()).toBe("3 marked, in sprite pixels: (8, 8) (9, 8) (2, 2)");
    await click(4, 3);
    await expect.poll(() => page.getByTestId("key-pixel-count").textContent()).toBe("2 marked, in sprite pixels: (8, 8) (9, 8)");
    await page.getByRole("button", { name: "Done", exact: true }).click();

    // The table gains the key pixels' own max error (core's diagnostics over a mask of the two, as compileTables gives
    // them) and the pairs of touching key pixels that no longer touch: found here with core's renderImage of a picture
    // whose only drawn pixels are the two keys, each its own index.
    const keyMask = new Uint8Array(20 * 18);
    keyMask[9 * 20 + 10] = keyMask[9 * 20 + 11] = 1;
    const tables = compileTables(world.doc, { mask: keyMask, workers: 0 });
    const keys: IndexedImage = {
      kind: "indexed",
      width: 20,
      height: 18,
      data: new Uint8Array(20 * 18),
      palette: [
        [0, 0, 0, 0],
        [255, 0, 0, 255],
        [0, 0, 255, 255],
      ],
    };
    keys.data[9 * 20 + 10] = 1;
    keys.data[9 * 20 + 11] = 2;
    const want = tables.frames.map((f) => {
      const out = renderImage(keys, f, world.doc, 3).data;
      const a = out.indexOf(1);
      const b = out.indexOf(2);
      const touch = a >= 0 && b >= 0 && Math.max(Math.abs((a % 20) - (b % 20)), Math.abs(Math.floor(a / 20) - Math.floor(b / 20))) <= 1;
      return [String(f.index), f.maxErrorPx.toFixed(3), touch ? "0" : "1"];
    });
    await expect
      .poll(async () => (await page.getByTestId("frame-table").locator("thead th").allTextContents()).join("|"))
      .toContain("Key err");
    await expect.poll(async () => (await tableRows(page)).map((c) => [c[0], c[10], c[11]])).toEqual(want);
    // The keys' error is their own, not the sprite's: on some frame it is below the frame's largest error.
    const rows = await tableRows(page);
    expect(rows.some((c) => Number(c[10]) < Number(c[5]))).toBe(true);
    await screenshot(page, "bench-key-pixels");

    // The palette table's headings read as words apart ("Colour", "Source", "Frame"), not run together: at least
    // 8 CSS pixels between one heading's text and the next.
    const headings = await page
      .getByTestId("palette-histogram")
      .locator("thead th")
      .evaluateAll((ths) =>
        ths.slice(0, 3).map((th) => {
          const range = document.createRange();
          range.selectNodeContents(th);
          const r = range.getBoundingClientRect();
          return { text: th.textContent!.trim(), left: r.left, right: r.right };
        }),
      );
    expect(headings.map((h) => h.text)).toEqual(["Colour", "Source", "Frame"]);
    for (let i = 1; i < headings.length; i++) expect(headings[i].left - headings[i - 1].right).toBeGreaterThanOrEqual(8);

    await page.getByRole("button", { name: "Save version 2" }).click();
    await expect.poll(() => page.getByTestId("save-state").textContent()).toBe("Saved version 2.");
    expect((await saved(world.effect.id)).keyPixels).toEqual([
      [8, 8],
      [9, 8],
    ]);
    await context.close();
  });
});

describe("reduced motion", () => {
  it("holds playback to 6 fps or slower while the system asks for it, and says so beside the caution", async () => {
    const effectDoc = { canvas: { width: 20, height: 18 }, pivot: { x: 10, y: 9 }, angles: { sweep: { from: 0, to: 360, frames: 600 } } };
    const world = await benchWorld(db, effectDoc, { sprite: true });
    const { context, page } = await signInAs(e2e.browser, world.editor);
    await page.emulateMedia({ reducedMotion: "reduce" });
    await page.goto(`/effects/${world.effect.id}`);
    const caution = page.getByTestId("photosensitivity-caution");
    await expect.poll(() => caution.textContent()).toContain("Your system asks for reduced motion, so playing is held to 6 fps or slower.");
    await expect.poll(() => page.getByLabel("Speed").locator("option").allTextContents()).toEqual(["6 fps", "2 fps", "1 fps"]);
    await expect.poll(() => page.getByRole("button", { name: "Play" }).getAttribute("aria-pressed")).toBe("false");

    // Play for a while: at 6 fps at most ⌊elapsed × 6 / 1000⌋ frames go by (the player never runs ahead of the clock).
    const started = await page.evaluate(() => {
      (document.querySelector('[data-testid="player-controls"] button[aria-pressed]') as HTMLButtonElement).click();
      return performance.now();
    });
    await expect.poll(() => page.getByTestId("frame-number").textContent()).not.toBe("0 / 599");
    await page.waitForTimeout(1500);
    const { text, now } = await page.evaluate(() => ({
      text: document.querySelector('[data-testid="frame-number"]')!.textContent!,
      now: performance.now(),
    }));
    await page.getByRole("button", { name: "Pause" }).click();
    const advanced = Number(text.split(" / ")[0]);
    expect(advanced).toBeGreaterThan(0);
    expect(advanced).toBeLessThanOrEqual(Math.floor(((now - started) * 6) / 1000));

    // When the system stops asking, the full rates come back and the note goes, without a reload.
    await page.emulateMedia({ reducedMotion: "no-preference" });
    await expect
      .poll(() => page.getByLabel("Speed").locator("option").allTextContents())
      .toEqual(["60 fps", "50 fps", "30 fps", "25 fps", "12 fps", "6 fps", "2 fps", "1 fps"]);
    await expect.poll(() => caution.textContent()).not.toContain("reduced motion");
    expect(await caution.textContent()).toContain("photosensitive epilepsy");
    await context.close();
  });
});

describe("a long track's export", () => {
  it("makes the files of a 4096-frame effect in the worker with a progress bar while the page keeps drawing", async () => {
    const effectDoc = { canvas: { width: 96, height: 64 }, pivot: { x: 48, y: 32 }, angles: { sweep: { from: 0, to: 360, frames: 4096 } } };
    const world = await benchWorld(db, effectDoc);
    const { context, page } = await signInAs(e2e.browser, world.editor);
    await page.goto(`/effects/${world.effect.id}`);
    // 4096 × (96 + 64) shifts is past what the panel makes by itself: it offers to make them.
    const make = page.getByRole("button", { name: "Make the files" });
    await expect.poll(() => make.isEnabled()).toBe(true);
    expect(await page.getByTestId("export-panel").textContent()).toContain("4096 frames of 96 + 64 shifts");

    // Sample the progress bar on every animation frame the page draws: if the page kept drawing during the export,
    // the bar is seen at several values on the way.
    await page.evaluate(() => {
      const seen: [number, number][] = [];
      (window as unknown as { exportSeen: typeof seen }).exportSeen = seen;
      const tick = () => {
        const bar = document.querySelector<HTMLProgressElement>("#export-progress-bar");
        if (bar) seen.push([bar.value, bar.max]);
        requestAnimationFrame(tick);
      };
      requestAnimationFrame(tick);
    });
    await make.click();
    await expect.poll(() => page.getByRole("tablist", { name: "Files of the bundle" }).count(), { timeout: 60_000 }).toBe(1);
    expect(await page.getByTestId("export-progress").count()).toBe(0);
    const seen = await page.evaluate(() => (window as unknown as { exportSeen: [number, number][] }).exportSeen);
    const values = [...new Set(seen.map(([v]) => v))];
    // The page drew several frames while the bar showed, and the bar moved. How many values it shows depends on how
    // the worker's steps fall between frames on a busy machine, so two distinct values are the least asked for.
    expect(seen.length).toBeGreaterThanOrEqual(3);
    expect(values.length).toBeGreaterThanOrEqual(2);
    // The bar only moves forward, and what it counts towards stays within the frames' work.
    expect(values).toEqual([...values].sort((a, b) => a - b));
    const totals = new Set(seen.filter(([v]) => v > 0).map(([, max]) => max));
    expect(totals.size).toBe(1);
    expect(Math.max(...values)).toBeLessThanOrEqual([...totals][0]);
    // The page answered meanwhile and still does: a step lands at once.
    await page.getByRole("button", { name: "Next frame" }).click();
    await expect.poll(() => page.getByTestId("frame-number").textContent()).toBe("1 / 4095");
    expect(await page.getByRole("tab").count()).toBeGreaterThan(1);
    await context.close();
  });
});
