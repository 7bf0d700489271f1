import { afterAll, describe, expect, it } from "vitest";
import { canvasFit, decodePng, opaqueMask, parseEffect } from "../../src/index.ts";
import { workdir } from "../helpers/cli.ts";
import { pngBytes } from "../helpers/pngBytes.ts";

const w = workdir();
afterAll(() => w.remove());

const effectDoc = { canvas: { width: 24, height: 20 }, pivot: { x: 12, y: 10 }, angles: { sweep: { from: 0, to: 360, frames: 12 } } };
const effect = parseEffect(effectDoc);
w.write("effect.json", effectDoc);
// A 20 × 12 block of palette index 1 in a canvas-sized indexed PNG.
const samples = Array.from({ length: 480 }, (_, i) => (i % 24 >= 2 && i % 24 < 22 && i >= 4 * 24 && i < 16 * 24 ? 1 : 0));
const sprite = pngBytes({
  width: 24,
  height: 20,
  depth: 8,
  colorType: 3,
  samples,
  palette: [
    [0, 0, 0],
    [255, 255, 255],
  ],
});
w.write("sprite.png", sprite);

describe("skewsmith fit (the real binary)", () => {
  it("--json prints the canvas fit of the whole canvas, and --image restricts it to the picture's non-background pixels", async () => {
    const [whole, masked] = await Promise.all([
      w.run("fit", "effect.json", "--json"),
      w.run("fit", "effect.json", "--image", "sprite.png", "--json", "--align", "4"),
    ]);
    for (const r of [whole, masked]) {
      expect(r.code).toBe(0);
      expect(r.stderr).toBe("");
      expect(r.stdout.trimEnd().includes("\n")).toBe(false);
    }
    expect(JSON.parse(whole.stdout)).toEqual(canvasFit(effect));
    const fit = JSON.parse(masked.stdout);
    expect(fit).toEqual(canvasFit(effect, { mask: opaqueMask(decodePng(sprite)), align: 4 }));
    expect(fit.content).toEqual({ x: 2, y: 4, width: 20, height: 12 });
    expect([fit.width % 4, fit.height % 4]).toEqual([0, 0]);
  });

  it("prints a plain report on stdout by default", async () => {
    const r = await w.run("fit", "effect.json", "--image", "sprite.png");
    expect(r.code).toBe(0);
    expect(r.stderr).toBe("");
    const fit = canvasFit(effect, { mask: opaqueMask(decodePng(sprite)) });
    expect(r.stdout).toContain(`Smallest canvas: ${fit.width}×${fit.height}`);
    expect(r.stdout).toContain(`Pivot on the new canvas: (${fit.pivot.x}, ${fit.pivot.y})`);
    expect(r.stdout).toContain(fit.fitsNow ? "already holds every frame" : `frame ${fit.worstFrame} reaches furthest out`);
  });

  it("a bad --align or a picture of the wrong size is a usage error: exit 2, nothing on stdout", async () => {
    w.write("tiny.png", pngBytes({ width: 2, height: 2, depth: 8, colorType: 0, samples: [1, 2, 3, 4] }));
    const [align, size] = await Promise.all([
      w.run("fit", "effect.json", "--align", "0"),
      w.run("fit", "effect.json", "--image", "tiny.png"),
    ]);
    for (const r of [align, size]) {
      expect(r.code).toBe(2);
      expect(r.stdout).toBe("");
    }
    expect(align.stderr).toMatch(/--align: "0" is not allowed; allowed a whole number from 1 to 4096/);
    expect(size.stderr).toMatch(/2×2 pixels; must equal the effect's canvas, 24×20/);
  });
});
