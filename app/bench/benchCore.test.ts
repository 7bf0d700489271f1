import { canvasFit, compileShifts, frameDiagnostics, parseEffect, renderImage, type IndexedImage } from "@skewsmith/core";
import { describe, expect, it } from "vitest";
import { compassRose } from "../demo/art.ts";
import { FramePainter } from "./framePainter.ts";
import { outline, prepareSource } from "./source.ts";
import { TrackDiagnosis } from "./trackDiagnosis.ts";
import { exportDefaultsForProfile } from "../exports/defaults.ts";
import { exportChoiceFrom, exportInput, exportZipHref } from "./exportChoice.ts";
import { growToFit } from "./fit.ts";

const rose = compassRose(16);
const effect = (patch: Record<string, unknown> = {}) =>
  parseEffect({ canvas: { width: 20, height: 18 }, pivot: { x: 10, y: 9 }, angles: { sweep: { from: 0, to: 360, frames: 24 } }, ...patch });

describe("the bench's computing (source, track diagnosis, frame painter)", () => {
  it("measures every frame with core's frameDiagnostics over the sprite's opaque pixels", () => {
    const e = effect();
    const source = prepareSource(e, rose, null, null, []);
    const rows = new TrackDiagnosis(e, source).all();
    const tables = compileShifts(e);
    expect(rows).toHaveLength(24);
    rows.forEach((row, i) => expect(row).toMatchObject(frameDiagnostics(tables.frames[i], e, source.mask!)));
    // The sprite (16 × 16) sits centred: its top-left pixel at (2, 1).
    expect(source.placement).toEqual({ x: 2, y: 1 });
  });

  it("draws each pass exactly as core's renderImage does, colours from the palette", () => {
    const e = effect();
    const source = prepareSource(e, rose, 1, 0, []);
    const painter = new FramePainter(e, source, compileShifts(e));
    for (const pass of [1, 2, 3] as const) {
      const picture = painter.paint(7, pass, { marks: false, error: false, keys: false });
      const expected = renderImage(source.image, compileShifts(e).frames[7], e, pass) as IndexedImage;
      const rgba = Array.from(expected.data, (i) => expected.palette[i]).flat();
      expect(Array.from(picture.rgba)).toEqual(rgba);
    }
  });

  it("marks the wrapped pixels core counts, and its largest error per pixel is core's max error", () => {
    // A canvas too small for the turned rose, so that frames wrap.
    const e = effect({ canvas: { width: 16, height: 16 }, pivot: { x: 8, y: 8 } });
    const source = prepareSource(e, rose, null, null, []);
    const tables = compileShifts(e);
    const painter = new FramePainter(e, source, tables);
    let wrappedFrames = 0;
    for (let i = 0; i < tables.frames.length; i++) {
      const core = frameDiagnostics(tables.frames[i], e, source.mask!);
      const picture = painter.paint(i, 3, { marks: true, error: true, keys: false });
      expect(picture.wrappedCount).toBe(core.wrapped);
      expect(picture.maxErrorPx).toBeCloseTo(core.maxErrorPx, 9);
      if (core.wrapped > 0) wrappedFrames++;
    }
    expect(wrappedFrames).toBeGreaterThan(0);
  });

  it("finds the pixels lost at the edge in clip mode, as many as core counts", () => {
    const e = effect({ canvas: { width: 16, height: 16 }, pivot: { x: 8, y: 8 }, edges: "clip" });
    const source = prepareSource(e, rose, null, null, []);
    const tables = compileShifts(e);
    const picture = new FramePainter(e, source, tables).paint(3, 3, { marks: true, error: false, keys: false });
    expect(picture.lostCount).toBe(frameDiagnostics(tables.frames[3], e, source.mask!).clipped);
    expect(picture.lost!.length).toBe(2 * picture.lostCount);
  });

  it("follows key pixels: their error over a mask, and touching pairs that come apart", () => {
    const e = effect({ angles: { list: [0, 45, 180] } });
    const keys: [number, number][] = [
      [5, 5],
      [6, 5],
      [6, 6],
      [12, 3],
    ];
    const source = prepareSource(e, rose, null, null, keys);
    expect(source.keyPairs).toEqual([
      [0, 1],
      [0, 2],
      [1, 2],
    ]);
    const rows = new TrackDiagnosis(e, source).all();
    // No turn: nothing moves, nothing comes apart.
    expect(rows[0]).toMatchObject({ keyMaxErrorPx: 0, keyApart: 0 });
    // A half turn is the free flip about a corner pivot: exact, and neighbours stay neighbours.
    expect(rows[2]).toMatchObject({ keyApart: 0 });
    expect(rows[2].keyMaxErrorPx).toBeCloseTo(0, 9);
    const mask = new Uint8Array(20 * 18);
    for (const [x, y] of keys) mask[(y + source.placement!.y) * 20 + x + source.placement!.x] = 1;
    expect(rows[1].keyMaxErrorPx).toBe(frameDiagnostics(compileShifts(e).frames[1], e, mask).maxErrorPx);
  });

  it("outlines the opaque pixels along pixel edges (a closed border around a square)", () => {
    const square: IndexedImage = {
      kind: "indexed",
      width: 2,
      height: 2,
      data: Uint8Array.of(1, 1, 1, 1),
      palette: [
        [0, 0, 0, 0],
        [9, 9, 9, 255],
      ],
    };
    const e = effect({ canvas: { width: 4, height: 4 }, pivot: { x: 2, y: 2 } });
    const lines = Array.from(outline(prepareSource(e, square, 1, 1, [])));
    expect(lines).toEqual([1, 1, 3, 1, 1, 3, 3, 3, 1, 1, 1, 3, 3, 1, 3, 3]);
  });
});

describe("growing the canvas to fit", () => {
  it("grows only the sides core's fit grows, keeps the rest, and moves the pivot by the left and top growth", () => {
    const e = effect({ canvas: { width: 16, height: 16 }, pivot: { x: 8, y: 8 } });
    const source = prepareSource(e, rose, null, null, []);
    const fit = canvasFit(e, { mask: source.mask! });
    const g = growToFit(e, fit);
    expect(g.width).toBe(16 + Math.max(0, fit.change.left) + Math.max(0, fit.change.right));
    expect(g.pivot).toEqual({ x: 8 + g.left, y: 8 + g.top });
    // On the grown canvas, with the sprite moved by the same amount, nothing wraps any more.
    const grown = parseEffect({ ...e, canvas: { width: g.width, height: g.height }, pivot: g.pivot });
    const rows = new TrackDiagnosis(grown, prepareSource(grown, rose, source.placement!.x + g.left, source.placement!.y + g.top, [])).all();
    expect(rows.every((r) => r.wrapped === 0)).toBe(true);
    expect(growToFit(e, fit, 8).width % 8).toBe(0);
  });
});

describe("export choices", () => {
  it("takes the profile's dialects and label prefix, and builds the zip's address from the same options", () => {
    const choice = exportChoiceFrom(
      exportDefaultsForProfile({ dialects: ["6502"], labelPrefix: "rose", exportOptions: { sign: "scroll" } }, "Compass rose emblem"),
      "Compass rose emblem",
    );
    expect(choice).toMatchObject({ outputs: ["6502"], label: "rose_compass_rose", sign: "scroll", element: "auto" });
    expect(exportChoiceFrom(exportDefaultsForProfile(null, "Storm background tilt"), "Storm background tilt")).toMatchObject({
      label: "storm_background_tilt",
      outputs: ["c", "6502", "68k", "arm", "z80", "bin", "json", "runtime"],
    });
    expect(exportZipHref("e1", { ...choice, registerBits: "9", dedupe: true })).toBe(
      "/effects/e1/export.zip?outputs=6502&label=rose_compass_rose&sign=scroll&registerBits=9&element=auto&split=false&half=false&dedupe=true",
    );
  });

  it("names the option core refuses", () => {
    const choice = exportChoiceFrom({}, "x");
    expect(exportInput({ ...choice, label: "9lives" }, "x")).toMatchObject({ ok: false, field: "label" });
    expect(exportInput({ ...choice, registerBits: "40" }, "x")).toMatchObject({ ok: false, field: "registerBits" });
  });
});
