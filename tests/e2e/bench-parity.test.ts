/**
 * The bench computes in the browser with the same core as the command line: its tables document and its frames'
 * pixels must equal `skewsmith tables` and `skewsmith render` for the same effect and picture.
 */
import { compileTables, decodePng, opaqueMask, placeImage, type IndexedImage } from "@skewsmith/core";
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { spritePlacement } from "../../app/bench/placement.ts";
import { workdir } from "../../packages/core/test/helpers/cli.ts";
import { benchWorld, canvasPixels, placedPng, waitForTable } from "./benchWorld.ts";
import { signInAs, browserAndDb } from "./support.ts";

const e2e = browserAndDb();
const { db } = e2e;

const CASES = [
  {
    name: "a full turn, Q8.8, wrap",
    document: { canvas: { width: 20, height: 18 }, pivot: { x: 10, y: 9 }, angles: { sweep: { from: 0, to: 360, frames: 12 } } },
    frames: [0, 5, 9],
  },
  {
    name: "a list in Q1.7 with floor rounding, shears only, clip, column groups of 4",
    document: {
      canvas: { width: 24, height: 20 },
      pivot: { x: 11.5, y: 10 },
      angles: { list: [-30, 45, 90, 170] },
      fixedPoint: { bits: 8, fraction: 7 },
      rounding: "floor",
      halfTurn: "shear",
      edges: "clip",
      columnGroup: 4,
    },
    frames: [2, 3],
  },
  {
    name: "an eased tilt with nearest-up rounding",
    document: {
      canvas: { width: 32, height: 16 },
      pivot: { x: 16, y: 8 },
      angles: { sweep: { from: -12, to: 12, frames: 9, easing: "ease-in-out", includeEnd: true } },
      rounding: "nearest-up",
    },
    frames: [0, 8],
  },
];

describe("browser and command line agree", () => {
  for (const c of CASES)
    it(`on ${c.name}: the tables document and every pass of a frame`, async () => {
      const world = await benchWorld(db, c.document, { sprite: true });
      const { context, page } = await signInAs(e2e.browser, world.editor);
      const dir = workdir();
      try {
        const effectFile = dir.write("effect.json", JSON.stringify(world.doc));
        const { width, height } = world.doc.canvas;
        const at = spritePlacement(world.doc.canvas, world.image, null, null);
        dir.write("canvas.png", placedPng(world.image, width, height, at.x, at.y));

        // Tables: the bench's own export of the tables document (made in the worker), downloaded from the page.
        await page.goto(`/effects/${world.effect.id}`);
        const frames = "list" in world.doc.angles ? world.doc.angles.list.length : world.doc.angles.sweep.frames;
        await waitForTable(page, frames);
        // The per-frame table (the worker's, over the sprite's opaque pixels) shows what core's diagnostics give the
        // command line's compileTables for the same mask: frame, max and mean error, wrapped, clipped.
        const mask = opaqueMask(placeImage(world.image, width, height, at.x, at.y));
        const wantRows = compileTables(world.doc, { mask, workers: 0 }).frames.map((f) => [
          String(f.index),
          f.maxErrorPx.toFixed(3),
          f.meanErrorPx.toFixed(3),
          String(f.wrapped),
          String(f.clipped),
        ]);
        const shownRows = await page
          .getByTestId("frame-table")
          .locator("tbody tr")
          .evaluateAll((trs) =>
            trs.map((tr) => {
              const cells = Array.from(tr.querySelectorAll("td"), (td) => td.textContent!.trim());
              return [cells[0], cells[5], cells[6], cells[7], cells[8]];
            }),
          );
        expect(shownRows).toEqual(wantRows);
        for (const label of await page.getByTestId("export-panel").locator("fieldset").first().getByRole("checkbox").all())
          if ((await label.isChecked()) !== ((await label.getAttribute("name")) === "output-json")) await label.click();
        await page
          .getByRole("tab", { name: /\.json/ })
          .first()
          .click();
        const name = (await page.getByTestId("code-view").getAttribute("data-file"))!;
        const [download] = await Promise.all([
          page.waitForEvent("download"),
          page.getByRole("button", { name: `Download ${name}` }).click(),
        ]);
        const browserTables = JSON.parse(readFileSync((await download.path())!, "utf8"));
        const cli = await dir.run("tables", effectFile);
        expect(cli.code).toBe(0);
        expect(browserTables).toEqual(JSON.parse(cli.stdout));

        // Pixels: the preview at zoom 1 with no overlay is the frame itself; the command line renders the same frames.
        const expected = new Map<string, number[]>();
        // One command at a time: each starts a Node process, and the browser tests share two cores with the rest.
        for (const frame of c.frames)
          for (const pass of [1, 2, 3]) {
            const out = `f${frame}p${pass}.png`;
            const rendered = await dir.run(
              "render",
              effectFile,
              "--image",
              "canvas.png",
              "--frame",
              String(frame),
              "--pass",
              String(pass),
              "--out",
              out,
            );
            expect(rendered.code, rendered.stderr).toBe(0);
            const image = decodePng(readFileSync(dir.path(out))) as IndexedImage;
            expected.set(`${frame}/${pass}`, Array.from(image.data, (i) => image.palette[i]).flat());
          }
        await page.goto(`/effects/${world.effect.id}?frame=${c.frames[0]}&pass=1&zoom=1`);
        await waitForTable(page, frames);
        for (const frame of c.frames) {
          await page.getByLabel("Frame", { exact: true }).fill(String(frame));
          for (const pass of [1, 2, 3]) {
            await page.getByRole("radio", { name: new RegExp(`^Pass ${pass}:`) }).check({ force: true });
            const want = JSON.stringify(expected.get(`${frame}/${pass}`));
            await expect.poll(async () => JSON.stringify(await canvasPixels(page)) === want, { timeout: 15_000 }).toBe(true);
          }
        }
      } finally {
        dir.remove();
        await context.close();
      }
    });
});
