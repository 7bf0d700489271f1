import { describe, expect, it } from "vitest";
import { canvasFit, compileTables, parseEffect, type CanvasFit, type Effect } from "../src/index.ts";

/** A mask of the rectangle [x, x + w) × [y, y + h) on a W × H canvas. */
function rectMask(W: number, H: number, x: number, y: number, w: number, h: number): Uint8Array {
  const m = new Uint8Array(W * H);
  for (let r = y; r < y + h; r++) for (let c = x; c < x + w; c++) if (r >= 0 && r < H && c >= 0 && c < W) m[r * W + c] = 1;
  return m;
}

/** The content mask moved onto a new W × H canvas with its old (0, 0) at (dx, dy). */
function moveMask(mask: Uint8Array, W: number, H: number, W2: number, H2: number, dx: number, dy: number): Uint8Array {
  const out = new Uint8Array(W2 * H2);
  for (let r = 0; r < H; r++)
    for (let c = 0; c < W; c++)
      if (mask[r * W + c]) {
        const c2 = c + dx;
        const r2 = r + dy;
        if (c2 < 0 || c2 >= W2 || r2 < 0 || r2 >= H2) throw new Error(`content pixel (${c}, ${r}) falls off the new canvas`);
        out[r2 * W2 + c2] = 1;
      }
  return out;
}

/** Total pixels that wrap (or clip) over every frame of the effect with the content mask, measured by the diagnostics (spec §6). */
function lost(effect: Effect, mask: Uint8Array): number {
  return compileTables(effect, { mask }).frames.reduce((n, f) => n + f.wrapped + f.clipped, 0);
}

/** The effect and mask on a canvas of the given size, with the content's old origin at (dx, dy) and the pivot moved with it. */
function onCanvas(effect: Effect, mask: Uint8Array, W2: number, H2: number, dx: number, dy: number) {
  const { width: W, height: H } = effect.canvas;
  return {
    effect: parseEffect({ ...effect, canvas: { width: W2, height: H2 }, pivot: { x: effect.pivot.x + dx, y: effect.pivot.y + dy } }),
    mask: moveMask(mask, W, H, W2, H2, dx, dy),
  };
}

/** Checks the advice: nothing lost on the advised canvas, something lost on each side trimmed by one pixel (one group on the left). */
function checkAdvice(effect: Effect, mask: Uint8Array, fit: CanvasFit) {
  const { change } = fit;
  expect(fit.pivot).toEqual({ x: effect.pivot.x + change.left, y: effect.pivot.y + change.top });
  expect(fit.width).toBe(effect.canvas.width + change.left + change.right);
  expect(fit.height).toBe(effect.canvas.height + change.top + change.bottom);
  const advised = onCanvas(effect, mask, fit.width, fit.height, change.left, change.top);
  expect(advised.effect.pivot).toEqual(fit.pivot);
  expect(lost(advised.effect, advised.mask), "pixels lost on the advised canvas").toBe(0);
  expect(lost({ ...advised.effect, edges: "clip" }, advised.mask), "pixels clipped on the advised canvas").toBe(0);
  const g = effect.columnGroup;
  const trims = {
    right: [fit.width - 1, fit.height, change.left, change.top],
    bottom: [fit.width, fit.height - 1, change.left, change.top],
    left: [fit.width - g, fit.height, change.left - g, change.top],
    top: [fit.width, fit.height - 1, change.left, change.top - 1],
  } as const;
  for (const [side, [W2, H2, dx, dy]] of Object.entries(trims)) {
    const trimmed = onCanvas(effect, mask, W2, H2, dx, dy);
    expect(lost(trimmed.effect, trimmed.mask), `trimming the ${side} side`).toBeGreaterThan(0);
  }
}

describe("canvasFit: the smallest canvas on which nothing wraps or clips (spec §5, §6)", () => {
  const sweep = { sweep: { from: 0, to: 360, frames: 24 } };

  it("grows a canvas that is too small, and its advice works and is minimal", () => {
    const effect = parseEffect({ canvas: { width: 24, height: 20 }, pivot: { x: 12, y: 10 }, angles: sweep });
    const mask = rectMask(24, 20, 3, 4, 18, 12);
    const fit = canvasFit(effect, { mask });
    expect(fit.fitsNow).toBe(false);
    expect(lost(effect, mask)).toBeGreaterThan(0);
    expect(fit.content).toEqual({ x: 3, y: 4, width: 18, height: 12 });
    expect(fit.withinLimits).toBe(true);
    checkAdvice(effect, mask, fit);
  });

  it("trims a canvas that is larger than needed, and says it already fits", () => {
    const effect = parseEffect({ canvas: { width: 64, height: 64 }, pivot: { x: 32.5, y: 30.5 }, angles: sweep });
    const mask = rectMask(64, 64, 27, 26, 9, 7);
    const fit = canvasFit(effect, { mask });
    expect(fit.fitsNow).toBe(true);
    expect(fit.worstFrame).toBe(-1);
    expect(fit.change.left).toBeLessThan(0);
    expect(fit.change.right).toBeLessThan(0);
    checkAdvice(effect, mask, fit);
  });

  it("an off-centre pivot and an asymmetric sprite, with clip edges, floor rounding and a shear half turn", () => {
    const effect = parseEffect({
      canvas: { width: 30, height: 26 },
      pivot: { x: 9, y: 17.5 },
      angles: { list: [-170, -100, -33, 12, 77, 140] },
      rounding: "floor",
      halfTurn: "shear",
      edges: "clip",
    });
    const mask = rectMask(30, 26, 4, 8, 14, 13);
    mask[8 * 30 + 4] = 0; // a notch: the bounding box is not the content
    const fit = canvasFit(effect, { mask });
    expect(fit.fitsNow).toBe(false);
    checkAdvice(effect, mask, fit);
  });

  it("column groups: the left side changes by whole groups so every column keeps its group's shift", () => {
    const effect = parseEffect({ canvas: { width: 40, height: 24 }, pivot: { x: 20, y: 12 }, angles: sweep, columnGroup: 4 });
    const mask = rectMask(40, 24, 13, 7, 14, 10);
    const fit = canvasFit(effect, { mask });
    expect(Number.isInteger(fit.change.left / 4)).toBe(true);
    checkAdvice(effect, mask, fit);
  });

  it("the worst frame is one that loses pixels on the current canvas", () => {
    const effect = parseEffect({ canvas: { width: 20, height: 20 }, pivot: { x: 10, y: 10 }, angles: { list: [0, 5, 45, 10] } });
    const mask = rectMask(20, 20, 1, 1, 18, 18);
    const fit = canvasFit(effect, { mask });
    expect(fit.worstFrame).toBe(2);
    expect(compileTables(effect, { mask }).frames[2].wrapped).toBeGreaterThan(0);
    expect(compileTables(effect, { mask }).frames[0].wrapped).toBe(0);
  });

  it("align rounds width and height up to a multiple, and the aligned canvas still holds everything", () => {
    const effect = parseEffect({ canvas: { width: 24, height: 20 }, pivot: { x: 12, y: 10 }, angles: sweep });
    const mask = rectMask(24, 20, 6, 6, 12, 8);
    const plain = canvasFit(effect, { mask });
    const aligned = canvasFit(effect, { mask, align: 8 });
    expect(aligned.width % 8).toBe(0);
    expect(aligned.height % 8).toBe(0);
    expect(aligned.width - plain.width).toBeLessThan(8);
    expect(aligned.width).toBeGreaterThanOrEqual(plain.width);
    const onIt = onCanvas(effect, mask, aligned.width, aligned.height, aligned.change.left, aligned.change.top);
    expect(lost(onIt.effect, onIt.mask)).toBe(0);
    expect(aligned.margin.right).toBe(plain.margin.right + aligned.width - plain.width);
  });

  it("without a mask every canvas pixel is content", () => {
    const effect = parseEffect({ canvas: { width: 10, height: 6 }, pivot: { x: 5, y: 3 }, angles: { list: [30] } });
    const fit = canvasFit(effect);
    expect(fit.content).toEqual({ x: 0, y: 0, width: 10, height: 6 });
    checkAdvice(effect, new Uint8Array(60).fill(1), fit);
  });

  it("a pivot outside the content keeps its pixels on the canvas", () => {
    // Content only far right; the pivot at the canvas's left edge must stay on (or at the edge of) the new canvas.
    const effect = parseEffect({ canvas: { width: 16, height: 8 }, pivot: { x: 0.5, y: 4 }, angles: { list: [0] } });
    const fit = canvasFit(effect, { mask: rectMask(16, 8, 12, 2, 3, 3) });
    expect(fit.pivot.x).toBeGreaterThanOrEqual(0);
    expect(fit.pivot.x).toBeLessThanOrEqual(fit.width);
    expect(fit.change.left).toBe(0);
    // Columns 0 (the pivot's) … 14 (the content's last) and rows 2 … 4 (the content's, which hold the pivot's neighbours 3, 4).
    expect(fit.width).toBe(15);
    expect(fit.height).toBe(3);
    expect(fit.pivot).toEqual({ x: 0.5, y: 2 });
  });

  it("reports a canvas beyond the limits for shears that would need one, without wrapping huge shifts (derived by hand)", () => {
    // bits 32, fraction 0, 180° by shear: kα = −2^31, kβ = 0. Row 1 (3 half-pixels below a pivot at y = 0) shifts by
    // −3·2^30 in each row pass, so pixel (0, 1) ends at x = −6·2^30; nothing reaches right of column 1.
    const effect = parseEffect({
      canvas: { width: 2, height: 2 },
      pivot: { x: 0, y: 0 },
      angles: { list: [180] },
      fixedPoint: { bits: 32, fraction: 0 },
      halfTurn: "shear",
    });
    const fit = canvasFit(effect);
    expect(fit.change).toEqual({ left: 6 * 2 ** 30, right: 0, top: 0, bottom: 0 });
    expect(fit.width).toBe(2 + 6 * 2 ** 30);
    expect(fit.withinLimits).toBe(false);
    expect(fit.fitsNow).toBe(false);
  });

  it("rejects a bad align or a mask of the wrong size, naming the value and the range", () => {
    const effect = parseEffect({ canvas: { width: 4, height: 4 }, pivot: { x: 2, y: 2 }, angles: { list: [0] } });
    expect(() => canvasFit(effect, { align: 0 })).toThrow(/align: 0.*1 to 4096/);
    expect(() => canvasFit(effect, { align: 2.5 })).toThrow(/align/);
    expect(() => canvasFit(effect, { mask: new Uint8Array(15) })).toThrow(/15.*16/);
  });
});
