import sharp from "sharp";
import { describe, expect, it } from "vitest";
import {
  Renderer,
  compileFrame,
  frameDiagnostics,
  imagePlane,
  opaqueMask,
  parseEffect,
  renderImage,
  type IndexedImage,
  type Rgba,
  type RgbaImage,
} from "../src/index.ts";
import { renderImageView } from "../src/renderImage.ts";
import { idealCentre } from "./helpers/reference.ts";

const palette: Rgba[] = [
  [0, 0, 0, 0],
  [200, 10, 10, 255],
  [10, 200, 10, 255],
  [10, 10, 200, 128],
];

describe("renderImage keeps the image's kind (spec §5)", () => {
  const effect = parseEffect({ canvas: { width: 10, height: 8 }, pivot: { x: 5, y: 4 }, angles: { list: [0] }, edges: "clip" });
  const frame = compileFrame(effect, 0, 50);

  it("an indexed image stays indexed with the same palette; clipped places hold index 0", () => {
    const data = Uint8Array.from({ length: 80 }, (_, i) => 1 + (i % 3));
    const image: IndexedImage = { kind: "indexed", width: 10, height: 8, data, palette };
    const out = renderImage(image, frame, effect) as IndexedImage;
    expect(out.kind).toBe("indexed");
    expect(out.palette).toEqual(palette);
    const expected = new Renderer(10, 8, Uint8Array).render(data, frame, effect);
    expect(Array.from(out.data)).toEqual(Array.from(expected));
    expect(out.data.filter((i) => i === 0).length).toBe(frameDiagnostics(frame, effect).clipped);
    expect(Array.from(image.data)).toEqual(Array.from(data)); // the input is untouched
  });

  it("an RGBA image stays RGBA, each pixel's four bytes moved together; clipped places are transparent black", () => {
    const data = Uint8Array.from({ length: 80 * 4 }, (_, i) => (i % 4 === 3 ? 255 : (i * 13 + 7) % 256));
    const image: RgbaImage = { kind: "rgba", width: 10, height: 8, data };
    const out = renderImage(image, frame, effect) as RgbaImage;
    expect(out.kind).toBe("rgba");
    const pixels = (d: Uint8Array) => Array.from({ length: 80 }, (_, i) => Array.from(d.subarray(4 * i, 4 * i + 4)).join(","));
    const src = new Set(pixels(data));
    const got = pixels(out.data);
    for (const p of got) if (p !== "0,0,0,0") expect(src.has(p)).toBe(true);
    expect(got.filter((p) => p === "0,0,0,0").length).toBe(frameDiagnostics(frame, effect).clipped);
  });

  it.each([1, 2, 3] as const)("stops after pass %i when asked", (pass) => {
    const image: IndexedImage = { kind: "indexed", width: 10, height: 8, data: Uint8Array.from({ length: 80 }, (_, i) => i % 4), palette };
    const expected = new Renderer<Uint8Array>(10, 8, Uint8Array).render(image.data, frame, effect, pass);
    expect(Array.from(renderImage(image, frame, effect, pass).data)).toEqual(Array.from(expected));
  });

  it("refuses an image that is not canvas-sized, naming both sizes", () => {
    const image: IndexedImage = { kind: "indexed", width: 9, height: 8, data: new Uint8Array(72), palette };
    expect(() => renderImage(image, frame, effect)).toThrow(/9×8.*10×8/);
  });
});

/**
 * Reference: sharp's nearest-neighbour affine turn (libvips `affine`).
 *
 * Conventions, from sharp's documentation and worked out with probes: sharp maps input (x, y) to output
 * X = a·(x + idx) + b·(y + idy) + odx (likewise Y) with (0, 0) the top-left corner of the image, so the matrix
 * [[cos θ, −sin θ], [sin θ, cos θ]] turns clockwise on screen like spec §1. libvips fills output pixel (X, Y) from the
 * point X + left − odx (its top-left corner, not its centre), mapped back through the inverse matrix, minus idx, taking the
 * input pixel that contains it; `left`, `top` are the corner of the bounding box of the turned image, which sharp does not
 * report, computed without the offsets. With idx = −(pc + ½), idy = −(pr + ½) for a pivot on the centre of pixel (pc, pr)
 * and whole-pixel odx, ody (the turned pivot, rounded, so the picture stays inside that box), every output corner it
 * samples lies a whole number of pixels from the pivot, just as canvas pixel centres do: the library does centre-to-centre
 * nearest-neighbour rotation about the pivot. The pivot pixel samples itself exactly and so appears exactly once:
 * finding it registers the library's output on the canvas.
 */
async function sharpTurn(image: RgbaImage, degrees: number, pc: number, pr: number) {
  const t = (degrees * Math.PI) / 180;
  const { data, info } = await sharp(image.data, { raw: { width: image.width, height: image.height, channels: 4 } })
    .affine(
      [
        [Math.cos(t), -Math.sin(t)],
        [Math.sin(t), Math.cos(t)],
      ],
      {
        idx: -(pc + 0.5),
        idy: -(pr + 0.5),
        odx: Math.round((pc + 0.5) * Math.cos(t) - (pr + 0.5) * Math.sin(t)),
        ody: Math.round((pc + 0.5) * Math.sin(t) + (pr + 0.5) * Math.cos(t)),
        interpolator: "nearest",
        background: { r: 0, g: 0, b: 0, alpha: 0 },
      },
    )
    .raw()
    .toBuffer({ resolveWithObject: true });
  const key = (d: Uint8Array, i: number) => (d[4 * i + 3] === 0 ? 0 : (d[4 * i] << 16) | (d[4 * i + 1] << 8) | d[4 * i + 2]);
  const pivotKey = key(image.data, pr * image.width + pc);
  const anchors: number[] = [];
  for (let i = 0; i < info.width * info.height; i++) if (key(data, i) === pivotKey) anchors.push(i);
  expect(anchors, "the pivot pixel appears exactly once in the library's output").toHaveLength(1);
  const ax = anchors[0] % info.width;
  const ay = Math.floor(anchors[0] / info.width);
  // colour → every canvas position where the library put it
  const where = new Map<number, { x: number; y: number }[]>();
  for (let i = 0; i < info.width * info.height; i++) {
    const k = key(data, i);
    if (k === 0) continue;
    const p = { x: (i % info.width) - ax + pc, y: Math.floor(i / info.width) - ay + pr };
    where.set(k, [...(where.get(k) ?? []), p]);
  }
  return where;
}

describe("agreement with an ordinary nearest-neighbour rotation (sharp/libvips affine)", () => {
  // 48 × 48 canvas, pivot on the centre of pixel (24, 24), a 17 × 13 sprite of distinct opaque colours around it.
  const W = 48;
  const pc = 24;
  const pr = 24;
  const data = new Uint8Array(W * W * 4);
  const colourOf = new Map<number, { c: number; r: number }>();
  for (let r = pr - 6; r <= pr + 6; r++)
    for (let c = pc - 8; c <= pc + 8; c++) {
      const i = r * W + c;
      data.set([(i >> 8) + 1, i & 255, 77, 255], 4 * i);
      colourOf.set((((i >> 8) + 1) << 16) | ((i & 255) << 8) | 77, { c, r });
    }
  const sprite: RgbaImage = { kind: "rgba", width: W, height: W, data };
  const effect = parseEffect({ canvas: { width: W, height: W }, pivot: { x: pc + 0.5, y: pr + 0.5 }, angles: { list: [0] } });
  const mask = opaqueMask(sprite);

  it.each([90, -90, 180])("at %i° both turns are exact and identical", async (degrees) => {
    const ours = imagePlane(renderImage(sprite, compileFrame(effect, 0, degrees), effect) as RgbaImage);
    const theirs = await sharpTurn(sprite, degrees, pc, pr);
    for (const [colour, { c, r }] of colourOf) {
      const p = theirs.get(colour)!;
      expect(p).toHaveLength(1);
      const mine = imagePlane({ kind: "rgba", width: 1, height: 1, data: data.subarray(4 * (r * W + c), 4 * (r * W + c) + 4) })[0];
      expect(ours[p[0].y * W + p[0].x]).toBe(mine);
    }
  });

  it.each([7, 30, 45, 60, 100, 135, -20, -75, -150, 171])(
    "at %i° every pixel lands within maxErrorPx + √2/2 of where the library puts it",
    async (degrees) => {
      const frame = compileFrame(effect, 0, degrees);
      const diag = frameDiagnostics(frame, effect, mask);
      expect(diag.wrapped).toBe(0);
      const out = renderImage(sprite, frame, effect) as RgbaImage;
      const ours = new Map<number, { x: number; y: number }>();
      for (let i = 0; i < W * W; i++) {
        const d = out.data;
        if (d[4 * i + 3]) ours.set((d[4 * i] << 16) | (d[4 * i + 1] << 8) | d[4 * i + 2], { x: i % W, y: Math.floor(i / W) });
      }
      expect(ours.size).toBe(colourOf.size); // nothing lost: a permutation
      const theirs = await sharpTurn(sprite, degrees, pc, pr);
      let compared = 0;
      for (const [colour, { c, r }] of colourOf) {
        const ideal = idealCentre(c, r, degrees, effect.pivot);
        const mine = ours.get(colour)!;
        for (const p of theirs.get(colour) ?? []) {
          // The library's own rounding: its pixel centre lies within half a pixel on each axis of the ideal point.
          expect(Math.hypot(p.x + 0.5 - ideal.x, p.y + 0.5 - ideal.y), "library vs ideal").toBeLessThanOrEqual(Math.SQRT1_2 + 1e-9);
          expect(Math.hypot(p.x - mine.x, p.y - mine.y), `pixel (${c}, ${r})`).toBeLessThanOrEqual(diag.maxErrorPx + Math.SQRT1_2 + 1e-9);
          compared++;
        }
      }
      // Nearest-neighbour resampling drops and doubles a few pixels, but keeps nearly all.
      expect(compared).toBeGreaterThan(0.8 * colourOf.size);
    },
  );
});

describe("renderImage into a caller's buffer, with its renderers kept across calls", () => {
  const effect = parseEffect({ canvas: { width: 33, height: 21 }, pivot: { x: 16.5, y: 10.5 }, angles: { list: [0] } });
  const frames = [17, 100, -61].map((d) => compileFrame(effect, 0, d));
  const rgba: RgbaImage = {
    kind: "rgba",
    width: 33,
    height: 21,
    data: Uint8Array.from({ length: 33 * 21 * 4 }, (_, i) => (i * 37 + 11) % 256),
  };
  const expectedFor = (f: (typeof frames)[number], pass: 1 | 2 | 3) =>
    Array.from(
      new Uint8Array(
        new Renderer<Uint32Array<ArrayBufferLike>>(33, 21, Uint32Array).render(imagePlane(rgba) as Uint32Array, f, effect, pass).buffer,
      ),
    );

  it("fills `out` with the frame and returns it as the image's pixels, for every pass", () => {
    for (const f of frames)
      for (const pass of [1, 2, 3] as const) {
        const out = new Uint8Array(33 * 21 * 4).fill(9);
        const image = renderImage(rgba, f, effect, pass, out);
        expect(image.data).toBe(out);
        expect(Array.from(out)).toEqual(expectedFor(f, pass));
      }
  });

  it("takes an `out` that 32-bit words cannot view (an odd offset) and still fills it", () => {
    const backing = new Uint8Array(33 * 21 * 4 + 1);
    const out = backing.subarray(1);
    renderImage(rgba, frames[1], effect, 3, out);
    expect(Array.from(out)).toEqual(expectedFor(frames[1], 3));
  });

  it("refuses an `out` of the wrong size, naming both sizes, and one that is the image itself", () => {
    expect(() => renderImage(rgba, frames[0], effect, 3, new Uint8Array(10))).toThrow("out: 10 bytes, expected 2772 (the image's)");
    expect(() => renderImage(rgba, frames[0], effect, 3, rgba.data)).toThrow(/shares memory with the source/);
  });

  it("draws the same pixels after other sizes and kinds used and dropped the kept renderers in between", () => {
    const first = Array.from(renderImage(rgba, frames[2], effect).data);
    for (let w = 5; w < 11; w++) {
      const e = parseEffect({ canvas: { width: w, height: 4 }, pivot: { x: w / 2, y: 2 }, angles: { list: [0] } });
      const image: IndexedImage = {
        kind: "indexed",
        width: w,
        height: 4,
        data: Uint8Array.from({ length: 4 * w }, (_, i) => i % 4),
        palette,
      };
      const expected = new Renderer<Uint8Array<ArrayBufferLike>>(w, 4, Uint8Array).render(image.data, compileFrame(e, 0, 30 * w), e);
      expect(Array.from(renderImage(image, compileFrame(e, 0, 30 * w), e).data)).toEqual(Array.from(expected));
    }
    expect(Array.from(renderImage(rgba, frames[2], effect).data)).toEqual(first);
    expect(first).toEqual(expectedFor(frames[2], 3));
  });

  it("renderImageView draws the same pixels without a copy, on a plane that the next call of that size reuses", () => {
    for (const f of frames)
      for (const pass of [1, 2, 3] as const) {
        const view = renderImageView(rgba, f, effect, pass);
        expect(view.kind).toBe("rgba");
        expect(Array.from(view.data)).toEqual(expectedFor(f, pass));
      }
    const first = renderImageView(rgba, frames[0], effect);
    const kept = Array.from(first.data);
    renderImageView(rgba, frames[1], effect);
    expect(Array.from(first.data)).not.toEqual(kept); // valid until the next call only, as documented
    expect(() =>
      renderImageView(rgba, frames[0], parseEffect({ canvas: { width: 3, height: 3 }, pivot: { x: 1, y: 1 }, angles: { list: [0] } })),
    ).toThrow("image: 33×21 pixels; must equal the canvas, 3×3");
  });
});

describe("Renderer.renderInto", () => {
  const effect = parseEffect({ canvas: { width: 12, height: 9 }, pivot: { x: 6, y: 4.5 }, angles: { list: [0] }, edges: "clip" });
  const src = Uint32Array.from({ length: 108 }, (_, i) => i + 1);

  it("writes what render returns into the caller's plane, for every pass", () => {
    const renderer = new Renderer(12, 9, Uint32Array);
    for (const degrees of [33, 147, -95])
      for (const pass of [1, 2, 3] as const) {
        const f = compileFrame(effect, 0, degrees);
        const dst = new Uint32Array(108).fill(7);
        renderer.renderInto(src, dst, f, effect, pass);
        expect(Array.from(dst)).toEqual(Array.from(new Renderer(12, 9, Uint32Array).render(src, f, effect, pass)));
      }
  });

  it("refuses the renderer's own plane (returned by render) as source or destination", () => {
    const renderer = new Renderer(12, 9, Uint32Array);
    const f = compileFrame(effect, 0, 40);
    const own = renderer.render(src, f, effect, 1);
    expect(() => renderer.renderInto(own, new Uint32Array(108), f, effect)).toThrow(/own plane/);
  });
});
