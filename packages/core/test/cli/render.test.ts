import { existsSync, readFileSync } from "node:fs";
import sharp from "sharp";
import { afterAll, describe, expect, it } from "vitest";
import { compileFrame, decodePng, parseEffect, renderImage, type IndexedImage, type RgbaImage } from "../../src/index.ts";
import { workdir } from "../helpers/cli.ts";
import { pngBytes } from "../helpers/pngBytes.ts";

const w = workdir();
afterAll(() => w.remove());

// 12 × 10 canvas, pivot on a pixel edge, a sweep of 4 frames: 0°, 90°, 180°, 270°→−90°, edges clipped.
const effectDoc = {
  canvas: { width: 12, height: 10 },
  pivot: { x: 6, y: 5 },
  angles: { sweep: { from: 0, to: 360, frames: 4 } },
  edges: "clip",
};
const effect = parseEffect(effectDoc);
w.write("effect.json", effectDoc);

// An indexed canvas written by hand (PNG specification): index 0 transparent, 2-bit indices.
const palette = [
  [0, 0, 0],
  [250, 20, 20],
  [20, 250, 20],
  [20, 20, 250],
] as const;
const indices = Array.from({ length: 120 }, (_, i) => (i % 12 > 2 && i % 12 < 9 && i > 24 && i < 96 ? 1 + (i % 3) : 0));
w.write("sprite.png", pngBytes({ width: 12, height: 10, depth: 2, colorType: 3, samples: indices, palette, trns: [0] }));

describe("skewsmith render (the real binary)", () => {
  it("an indexed PNG comes out indexed with the same palette, drawn as the target does", async () => {
    const r = await w.run("render", "effect.json", "--image", "sprite.png", "--frame", "1", "--out", "out.png");
    expect([r.code, r.stdout, r.stderr]).toEqual([0, "", ""]);
    const out = decodePng(new Uint8Array(readFileSync(w.path("out.png")))) as IndexedImage;
    expect(out.kind).toBe("indexed");
    expect(out.palette).toEqual([[0, 0, 0, 0], ...palette.slice(1).map((c) => [...c, 255])]);
    const input = decodePng(new Uint8Array(readFileSync(w.path("sprite.png"))));
    const expected = renderImage(input, compileFrame(effect, 1, 90), effect) as IndexedImage;
    expect(Array.from(out.data)).toEqual(Array.from(expected.data));
    // Index 0 stays the background and the content is not lost: a 6 × 6 block turns by 90° inside the canvas.
    expect(out.data.filter((i) => i !== 0).length).toBe(indices.filter((i) => i !== 0).length);
  });

  it("--pass 1 and 2 stop after the first row pass and the column pass", async () => {
    const [one, two] = await Promise.all(
      ["1", "2"].map((pass) =>
        w.run("render", "effect.json", "--image", "sprite.png", "--frame", "3", "--pass", pass, "--out", `pass${pass}.png`),
      ),
    );
    expect([one.code, two.code]).toEqual([0, 0]);
    const input = decodePng(new Uint8Array(readFileSync(w.path("sprite.png"))));
    const frame = compileFrame(effect, 3, 270);
    for (const pass of [1, 2] as const) {
      const got = decodePng(new Uint8Array(readFileSync(w.path(`pass${pass}.png`))));
      expect(Array.from(got.data)).toEqual(Array.from(renderImage(input, frame, effect, pass).data));
    }
  });

  it("an RGBA PNG comes out RGBA, transparent where nothing lands", async () => {
    const rgba = new Uint8Array(120 * 4);
    for (let i = 30; i < 90; i++) rgba.set([i, 255 - i, 7, 255], 4 * i);
    w.write(
      "rgba.png",
      await sharp(rgba, { raw: { width: 12, height: 10, channels: 4 } })
        .png()
        .toBuffer(),
    );
    const r = await w.run("render", "effect.json", "--image", "rgba.png", "--frame", "2", "--out", "rgba-out.png");
    expect([r.code, r.stdout, r.stderr]).toEqual([0, "", ""]);
    const out = decodePng(new Uint8Array(readFileSync(w.path("rgba-out.png")))) as RgbaImage;
    expect(out.kind).toBe("rgba");
    const image: RgbaImage = { kind: "rgba", width: 12, height: 10, data: rgba };
    expect(Array.from(out.data)).toEqual(Array.from(renderImage(image, compileFrame(effect, 2, 180), effect).data));
  });

  it("a PNG that is not canvas-sized is a clear error: exit 2, both sizes named, nothing on stdout, no file written", async () => {
    w.write("small.png", pngBytes({ width: 11, height: 10, depth: 8, colorType: 0, samples: new Array(110).fill(9) }));
    const r = await w.run("render", "effect.json", "--image", "small.png", "--frame", "0", "--out", "never.png");
    expect(r.code).toBe(2);
    expect(r.stdout).toBe("");
    expect(r.stderr).toContain("11×10");
    expect(r.stderr).toContain("12×10");
    expect(existsSync(w.path("never.png"))).toBe(false);
  });

  it("a frame outside the track, a missing option and a file that is not a PNG are usage errors naming what is allowed", async () => {
    w.write("not.png", "plain text");
    const [frame, noOut, notPng, pass] = await Promise.all([
      w.run("render", "effect.json", "--image", "sprite.png", "--frame", "4", "--out", "x.png"),
      w.run("render", "effect.json", "--image", "sprite.png", "--frame", "0"),
      w.run("render", "effect.json", "--image", "not.png", "--frame", "0", "--out", "x.png"),
      w.run("render", "effect.json", "--image", "sprite.png", "--frame", "0", "--pass", "4", "--out", "x.png"),
    ]);
    for (const r of [frame, noOut, notPng, pass]) {
      expect(r.code).toBe(2);
      expect(r.stdout).toBe("");
    }
    expect(frame.stderr).toMatch(/--frame: "4" is not allowed; allowed a whole number from 0 to 3/);
    expect(noOut.stderr).toMatch(/--out: required/);
    expect(notPng.stderr).toMatch(/not\.png: not a readable PNG/);
    expect(pass.stderr).toMatch(/--pass: "4" is not allowed; allowed a whole number from 1 to 3/);
    expect(existsSync(w.path("x.png"))).toBe(false);
  });
});
