import { describe, expect, it } from "vitest";
import { DISPLAY_MAX_PIXELS, errorShading, frameDisplay, zoomPixels } from "./display.ts";
import type { FramePicture } from "./framePainter.ts";

/** Nearest-neighbour zoom written the plain way: output pixel (x, y) is source pixel (⌊x / z⌋, ⌊y / z⌋). */
function naiveZoom(rgba: Uint8ClampedArray, w: number, h: number, z: number): number[] {
  const out: number[] = [];
  for (let y = 0; y < h * z; y++)
    for (let x = 0; x < w * z; x++) {
      const s = (Math.floor(y / z) * w + Math.floor(x / z)) * 4;
      out.push(rgba[s], rgba[s + 1], rgba[s + 2], rgba[s + 3]);
    }
  return out;
}

const picture = (w: number, h: number, seed: number): Uint8ClampedArray<ArrayBuffer> => {
  const rgba = new Uint8ClampedArray(w * h * 4);
  for (let i = 0; i < rgba.length; i++) rgba[i] = (i * 37 + seed * 11) & 255;
  return rgba;
};

describe("zoomPixels", () => {
  it.each([
    [1, 1, 1],
    [3, 2, 1],
    [5, 3, 2],
    [7, 4, 3],
    [2, 5, 16],
  ])("equals the plain nearest-neighbour zoom for %i × %i at %i×", (w, h, z) => {
    const rgba = picture(w, h, w + h + z);
    expect(Array.from(zoomPixels(rgba, w, h, z))).toEqual(naiveZoom(rgba, w, h, z));
  });

  it("overwrites every byte of a handed-back buffer, and ignores one of the wrong size", () => {
    const dirty = new ArrayBuffer(6 * 4 * 9 * 4).slice(0);
    new Uint8Array(dirty).fill(0xaa);
    const rgba = picture(6, 4, 3);
    const out = zoomPixels(rgba, 6, 4, 3, dirty);
    expect(out.buffer).toBe(dirty);
    expect(Array.from(out)).toEqual(naiveZoom(rgba, 6, 4, 3));
    const wrong = new ArrayBuffer(16);
    expect(zoomPixels(rgba, 6, 4, 3, wrong).buffer).not.toBe(wrong);
  });

  it("names the field and the allowed range for a bad zoom or size", () => {
    expect(() => zoomPixels(picture(2, 2, 0), 2, 2, 0)).toThrow(/zoom: 0 is not allowed; allowed a whole number from 1/);
    expect(() => zoomPixels(picture(2, 2, 0), 3, 2, 2)).toThrow(/rgba: 16 bytes is not 3 × 2 × 4/);
  });
});

describe("frameDisplay", () => {
  const frame = (w: number, h: number, error: Float32Array<ArrayBuffer> | null): FramePicture => ({
    rgba: picture(w, h, 1),
    colours: [],
    wrapped: null,
    wrappedCount: 0,
    lost: null,
    lostCount: 0,
    error,
    maxErrorPx: 0,
    keys: null,
  });

  it("shades only when asked and the error is there", () => {
    const error = Float32Array.from([0.1, Number.NaN, 0.6, 2]);
    const shaded = frameDisplay(frame(2, 2, error), 2, 2, 2, true)!;
    expect(shaded.shaded).toBe(true);
    expect(Array.from(shaded.pixels)).toEqual(naiveZoom(errorShading(frame(2, 2, error)), 2, 2, 2));
    expect(frameDisplay(frame(2, 2, null), 2, 2, 2, true)!.shaded).toBe(false);
    expect(frameDisplay(frame(2, 2, error), 2, 2, 2, false)!.shaded).toBe(false);
  });

  it("leaves a picture bigger than the limit to the canvas's own scaling", () => {
    const side = Math.ceil(Math.sqrt(DISPLAY_MAX_PIXELS)) + 1;
    expect(frameDisplay(frame(1, 1, null), 1, 1, side, false)).toBeNull();
  });
});
