import { decodePng, encodePng, parseEffect, type Image, type IndexedImage, type RgbaImage } from "@skewsmith/core";
import sharp from "sharp";
import { afterAll, describe, expect, it } from "vitest";
import { workdir } from "../../packages/core/test/helpers/cli.ts";
import { readIndexed } from "../../tests/support/pngSpec.ts";
import { COMPASS_EFFECT } from "../../scripts/db/seed.ts";
import { compassRose } from "../demo/art.ts";
import {
  contactSheet,
  framePicture,
  placedSource,
  SHEET_GAP,
  SHEET_GAP_COLOUR,
  SheetError,
  sheetLayout,
  SHEET_MAX_PIXELS,
} from "./frames.ts";

const w = workdir();
afterAll(() => w.remove());

/** Decodes a PNG with sharp (libvips), an outside reader, to RGBA bytes. */
async function sharpRgba(png: Uint8Array): Promise<number[]> {
  const { data } = await sharp(png).ensureAlpha().raw().toBuffer({ resolveWithObject: true });
  return [...data];
}

/** What `skewsmith render` (the real command line) writes for this effect, canvas picture, frame and pass. */
async function cliRender(document: object, canvas: Image, frame: number, pass: 1 | 2 | 3): Promise<Uint8Array> {
  const tag = `${frame}-${pass}-${Math.random().toString(36).slice(2)}`;
  w.write(`effect-${tag}.json`, document);
  w.write(`canvas-${tag}.png`, encodePng(canvas));
  const result = await w.run(
    "render",
    `effect-${tag}.json`,
    "--image",
    `canvas-${tag}.png`,
    "--frame",
    String(frame),
    "--pass",
    String(pass),
    "--out",
    `out-${tag}.png`,
  );
  expect(result.stderr).toBe("");
  expect(result.code).toBe(0);
  const { readFileSync } = await import("node:fs");
  return new Uint8Array(readFileSync(w.path(`out-${tag}.png`)));
}

const rgbaSprite: RgbaImage = {
  kind: "rgba",
  width: 12,
  height: 9,
  data: Uint8Array.from({ length: 12 * 9 * 4 }, (_, i) => (i % 4 === 3 ? ((i >> 2) % 5 === 0 ? 0 : 255) : (i * 41 + 7) % 256)),
};

describe("framePicture: the same pixels as `skewsmith render`", () => {
  it("draws the demo emblem (indexed, centred) like the command line, frame by frame and pass by pass", async () => {
    const effect = parseEffect(COMPASS_EFFECT.document);
    const source = placedSource(effect, compassRose(32), null, null);
    const cases = [
      [0, 3],
      [5, 1],
      [5, 2],
      [5, 3],
      [20, 3],
      [63, 3],
    ] as const;
    // Each case starts the real command line; they run side by side.
    const outputs = await Promise.all(cases.map(([frame, pass]) => cliRender(COMPASS_EFFECT.document, source, frame, pass)));
    for (const [k, [frame, pass]] of cases.entries()) {
      const ours = encodePng(framePicture(effect, source, frame, pass));
      // Palette indices, read by a reader written from the PNG specification, and colours as sharp reads them.
      expect([...readIndexed(ours).indices], `frame ${frame} pass ${pass}`).toEqual([...readIndexed(outputs[k]).indices]);
      expect(await sharpRgba(ours)).toEqual(await sharpRgba(outputs[k]));
    }
  }, 60_000);

  it("draws an RGBA sprite placed off-centre on a clipping canvas with half-turn flips like the command line", async () => {
    const document = {
      canvas: { width: 30, height: 22 },
      pivot: { x: 13.5, y: 11 },
      angles: { list: [0, 17, 95, -150, 180] },
      fixedPoint: { bits: 8, fraction: 6 },
      edges: "clip",
      rounding: "floor",
    };
    const effect = parseEffect(document);
    const source = placedSource(effect, rgbaSprite, 4, 7);
    // Frame 2 (95°) and 3 (−150°) flip first; 4 is the half turn itself.
    const cases = [
      [1, 3],
      [2, 1],
      [2, 2],
      [2, 3],
      [3, 3],
      [4, 3],
    ] as const;
    const outputs = await Promise.all(cases.map(([frame, pass]) => cliRender(document, source, frame, pass)));
    for (const [k, [frame, pass]] of cases.entries()) {
      const ours = framePicture(effect, source, frame, pass);
      expect(ours.kind).toBe("rgba");
      expect(await sharpRgba(encodePng(ours)), `frame ${frame} pass ${pass}`).toEqual(await sharpRgba(outputs[k]));
    }
  }, 60_000);

  it("gives the placed source for pass 0: the sprite's pixels at its place, background elsewhere", () => {
    const effect = parseEffect({ canvas: { width: 30, height: 22 }, pivot: { x: 15, y: 11 }, angles: { list: [30] } });
    const picture = framePicture(effect, placedSource(effect, rgbaSprite, 4, 7), 0, 0) as RgbaImage;
    const at = (img: RgbaImage, x: number, y: number) => [...img.data.subarray((y * img.width + x) * 4, (y * img.width + x) * 4 + 4)];
    expect(at(picture, 4, 7)).toEqual(at(rgbaSprite, 0, 0));
    expect(at(picture, 15, 15)).toEqual(at(rgbaSprite, 11, 8));
    expect(at(picture, 3, 7)).toEqual([0, 0, 0, 0]);
    expect(at(picture, 16, 15)).toEqual([0, 0, 0, 0]);
    // Centred when no place is stored: (30 − 12) / 2 = 9, ⌊(22 − 9) / 2⌋ = 6.
    expect(at(placedSource(effect, rgbaSprite, null, null) as RgbaImage, 9, 6)).toEqual(at(rgbaSprite, 0, 0));
    expect(() => framePicture(effect, picture, 1, 3)).toThrow("frame: 1 is not allowed; allowed a whole number from 0 to 0");
  });
});

describe("contactSheet", () => {
  const effect = parseEffect(COMPASS_EFFECT.document);
  const source = placedSource(effect, compassRose(32), null, null);

  it("lays every frame out in a roughly square grid with a grey gap, each cell exactly that frame", () => {
    const layout = sheetLayout(64, effect.canvas);
    // 64 cells of 48 × 32: √(64 · 32 / 48) ≈ 6.5, so 7 columns and 10 rows.
    expect([layout.columns, layout.rows, layout.every, layout.zoom]).toEqual([7, 10, 1, 1]);
    expect([layout.width, layout.height]).toEqual([7 * 48 + 8 * SHEET_GAP, 10 * 32 + 11 * SHEET_GAP]);
    const sheet = contactSheet(effect, source, 3, layout) as IndexedImage;
    expect(sheet.kind).toBe("indexed");
    expect(sheet.palette).toEqual([...compassRose(32).palette, SHEET_GAP_COLOUR]);
    const gap = sheet.palette.length - 1;
    for (const k of [0, 9, 63]) {
      const frame = framePicture(effect, source, k, 3) as IndexedImage;
      const x0 = SHEET_GAP + (k % 7) * (48 + SHEET_GAP);
      const y0 = SHEET_GAP + Math.floor(k / 7) * (32 + SHEET_GAP);
      for (let y = 0; y < 32; y++)
        expect([...sheet.data.subarray((y0 + y) * sheet.width + x0, (y0 + y) * sheet.width + x0 + 48)], `frame ${k} row ${y}`).toEqual([
          ...frame.data.subarray(y * 48, (y + 1) * 48),
        ]);
      expect(sheet.data[(y0 - 1) * sheet.width + x0]).toBe(gap);
      expect(sheet.data[y0 * sheet.width + x0 - 1]).toBe(gap);
    }
    // Past the last frame (64 = 9 rows of 7 + 1), the rest of the last row is gap colour.
    expect(sheet.data[(sheet.height - SHEET_GAP - 1) * sheet.width + sheet.width - SHEET_GAP - 1]).toBe(gap);
  });

  it("scales by whole pixels, takes every K-th frame, and gives RGBA for an RGBA source", async () => {
    const rgbaEffect = parseEffect({
      canvas: { width: 20, height: 14 },
      pivot: { x: 10, y: 7 },
      angles: { sweep: { from: 0, to: 90, frames: 10 } },
    });
    const rgbaSource = placedSource(rgbaEffect, rgbaSprite, null, null);
    const layout = sheetLayout(10, rgbaEffect.canvas, { zoom: 3, every: 4, columns: 3 });
    expect([layout.frames, layout.columns, layout.rows]).toEqual([[0, 4, 8], 3, 1]);
    const sheet = contactSheet(rgbaEffect, rgbaSource, 2, layout) as RgbaImage;
    expect(sheet.kind).toBe("rgba");
    const frame = framePicture(rgbaEffect, rgbaSource, 4, 2) as RgbaImage;
    const px = (img: RgbaImage, x: number, y: number) => [...img.data.subarray((y * img.width + x) * 4, (y * img.width + x) * 4 + 4)];
    const x0 = SHEET_GAP + 1 * (60 + SHEET_GAP);
    for (const [x, y] of [
      [0, 0],
      [7, 5],
      [19, 13],
    ])
      for (const [dx, dy] of [
        [0, 0],
        [2, 1],
        [1, 2],
      ])
        expect(px(sheet, x0 + x * 3 + dx, SHEET_GAP + y * 3 + dy)).toEqual(px(frame, x, y));
    expect(px(sheet, 0, 0)).toEqual([...SHEET_GAP_COLOUR]);
    // What sharp reads from the encoded sheet is the same picture.
    expect(await sharpRgba(encodePng(sheet))).toEqual([...sheet.data]);
    expect(decodePng(encodePng(sheet)).width).toBe(3 * 60 + 4 * SHEET_GAP);
  });

  it("thins frames to stay within 4096 × 4096 pixels when no step is asked for, and refuses a step that does not fit", () => {
    const canvas = { width: 256, height: 224 };
    const auto = sheetLayout(4096, canvas);
    expect(auto.every).toBeGreaterThan(1);
    expect(auto.width * auto.height).toBeLessThanOrEqual(SHEET_MAX_PIXELS);
    expect(() => sheetLayout(4096, canvas, { every: auto.every - 1 })).toThrow(SheetError);
    expect(() => sheetLayout(4096, canvas, { every: 1 })).toThrow(
      /^A sheet of every frame at zoom 1 would be \d+ × \d+ pixels; sheets are at most 16777216 pixels \(4096 × 4096\) and 16384 on a side\./,
    );
    expect(() => sheetLayout(1, { width: 4096, height: 4096 }, { zoom: 2 })).toThrow(
      /^Even one frame at zoom 2 makes a sheet of 8196 × 8196 pixels/,
    );
  });
});
