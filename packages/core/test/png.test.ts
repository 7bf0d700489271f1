import sharp from "sharp";
import { describe, expect, it } from "vitest";
import { PngError, decodePng, encodePng, type IndexedImage, type Rgba, type RgbaImage } from "../src/index.ts";
import { pngBytes, pngChunks } from "./helpers/pngBytes.ts";

/** Decodes a PNG with sharp (libvips/libspng), an outside reader, to RGBA bytes. */
async function sharpRgba(png: Uint8Array): Promise<number[]> {
  const { data } = await sharp(png).ensureAlpha().raw().toBuffer({ resolveWithObject: true });
  return Array.from(data);
}

const lookup = (image: IndexedImage) => Array.from(image.data).flatMap((i) => [...image.palette[i]]);

describe("indexed PNG round trip", () => {
  it("keeps indices and palette exactly when transparent entries sit anywhere in the palette (fast-png tRNS pitfall)", async () => {
    const palette: Rgba[] = [
      [10, 20, 30, 255],
      [0, 0, 0, 0],
      [200, 100, 50, 255],
      [1, 2, 3, 255],
      [90, 90, 250, 128],
      [255, 255, 255, 255],
    ];
    const data = Uint8Array.from({ length: 7 * 3 }, (_, i) => (i * 5) % 6);
    const image: IndexedImage = { kind: "indexed", width: 7, height: 3, data, palette };
    const png = encodePng(image);
    expect(decodePng(png)).toEqual(image);
    // An outside reader sees the same colours, alpha included.
    expect(await sharpRgba(png)).toEqual(lookup(image));
    // PNG specification, tRNS for colour type 3: one alpha per palette entry up to the last translucent one, after PLTE
    // and before IDAT.
    const chunks = pngChunks(png);
    const types = chunks.map((c) => c.type);
    expect(types.indexOf("tRNS")).toBe(types.indexOf("PLTE") + 1);
    expect(types.indexOf("tRNS")).toBeLessThan(types.indexOf("IDAT"));
    expect(Array.from(chunks.find((c) => c.type === "tRNS")!.body)).toEqual([255, 0, 255, 255, 128]);
    expect(chunks.find((c) => c.type === "IHDR")!.body[8]).toBe(8); // 8-bit indices
    expect(chunks.find((c) => c.type === "IHDR")!.body[9]).toBe(3); // colour type 3, palette
  });

  it("writes no tRNS when every palette entry is opaque, and keeps a full 256-entry palette", async () => {
    const palette: Rgba[] = Array.from({ length: 256 }, (_, i) => [i, 255 - i, (i * 3) % 256, 255]);
    const image: IndexedImage = {
      kind: "indexed",
      width: 16,
      height: 16,
      data: Uint8Array.from({ length: 256 }, (_, i) => 255 - i),
      palette,
    };
    const png = encodePng(image);
    expect(pngChunks(png).map((c) => c.type)).not.toContain("tRNS");
    expect(decodePng(png)).toEqual(image);
    expect(await sharpRgba(png)).toEqual(lookup(image));
  });

  it("a transparent last entry only is written too", () => {
    const palette: Rgba[] = [
      [1, 1, 1, 255],
      [2, 2, 2, 255],
      [3, 3, 3, 0],
    ];
    const image: IndexedImage = { kind: "indexed", width: 3, height: 1, data: Uint8Array.from([2, 1, 0]), palette };
    expect(decodePng(encodePng(image))).toEqual(image);
  });

  it("refuses to write a pixel whose index is beyond the palette, naming the pixel and the allowed indices", () => {
    const image: IndexedImage = {
      kind: "indexed",
      width: 2,
      height: 1,
      data: Uint8Array.from([0, 5]),
      palette: [
        [0, 0, 0, 255],
        [1, 1, 1, 255],
      ],
    };
    expect(() => encodePng(image)).toThrow(/pixel 1,0: palette index 5 .*0 to 1/);
  });

  it("refuses a palette of more than 256 colours, naming the count and the range", () => {
    const image: IndexedImage = {
      kind: "indexed",
      width: 1,
      height: 1,
      data: new Uint8Array(1),
      palette: new Array(257).fill([0, 0, 0, 255]),
    };
    expect(() => encodePng(image)).toThrow(/257.*1 to 256/);
  });
});

describe("palette PNGs of every depth read as indexed images (PNG files written by hand from the PNG specification)", () => {
  it.each([1, 2, 4, 8] as const)("depth %i, 13 pixels wide (rows padded to whole bytes)", async (depth) => {
    const colours = 2 ** Math.min(depth, 3);
    const palette = Array.from({ length: colours }, (_, i) => [i * 30, 255 - i * 30, (i * 77) % 256] as const);
    const indices = Array.from({ length: 13 * 4 }, (_, i) => (i * 3 + (i >> 4)) % colours);
    const trns = depth >= 2 ? [255, 0] : undefined; // entry 1 transparent
    const png = pngBytes({ width: 13, height: 4, depth, colorType: 3, samples: indices, palette, trns });
    const image = decodePng(png);
    expect(image.kind).toBe("indexed");
    const indexed = image as IndexedImage;
    expect(Array.from(indexed.data)).toEqual(indices);
    expect(indexed.palette).toEqual(palette.map((c, i) => [...c, trns && i < trns.length ? trns[i] : 255]));
    // The hand-written file is what an outside reader sees too.
    expect(await sharpRgba(png)).toEqual(lookup(indexed));
  });

  it("an index beyond the palette is an error naming the pixel and the palette size", () => {
    const png = pngBytes({
      width: 2,
      height: 1,
      depth: 8,
      colorType: 3,
      samples: [0, 3],
      palette: [
        [0, 0, 0],
        [9, 9, 9],
      ],
    });
    expect(() => decodePng(png)).toThrow(PngError);
    expect(() => decodePng(png)).toThrow(/1,0.*index 3.*2 colours/);
  });
});

describe("other PNGs read as 8-bit RGBA", () => {
  it("RGBA round trip, checked by an outside reader", async () => {
    const data = Uint8Array.from({ length: 5 * 4 * 4 }, (_, i) => (i * 37) % 256);
    const image: RgbaImage = { kind: "rgba", width: 5, height: 4, data };
    const png = encodePng(image);
    expect(decodePng(png)).toEqual(image);
    expect(await sharpRgba(png)).toEqual(Array.from(data));
  });

  it.each([
    // depth, samples, expected grey: v·255/(2^depth − 1) (PNG specification, sample depth scaling)
    [1, [0, 1, 1, 0], [0, 255, 255, 0]],
    [2, [0, 1, 2, 3], [0, 85, 170, 255]],
    [4, [0, 1, 8, 15], [0, 17, 136, 255]],
    [8, [0, 7, 128, 255], [0, 7, 128, 255]],
    [16, [0, 257, 32896, 65535], [0, 1, 128, 255]],
  ] as const)("greyscale of depth %i", (depth, samples, grey) => {
    const image = decodePng(pngBytes({ width: 4, height: 1, depth, colorType: 0, samples: [...samples] }));
    expect(image).toEqual({ kind: "rgba", width: 4, height: 1, data: Uint8Array.from(grey.flatMap((g) => [g, g, g, 255])) });
  });

  it("greyscale with a tRNS key makes that grey transparent", () => {
    const image = decodePng(pngBytes({ width: 3, height: 1, depth: 8, colorType: 0, samples: [10, 20, 10], trns: [10] }));
    expect(Array.from(image.data)).toEqual([10, 10, 10, 0, 20, 20, 20, 255, 10, 10, 10, 0]);
  });

  it("RGB with a tRNS key, grey + alpha and 16-bit RGBA", () => {
    // (At least 3 pixels: fast-png 8 rejects an RGB tRNS key on images of fewer pixels than the key has samples.)
    const rgb = decodePng(pngBytes({ width: 3, height: 1, depth: 8, colorType: 2, samples: [1, 2, 3, 4, 5, 6, 4, 5, 7], trns: [4, 5, 6] }));
    expect(Array.from(rgb.data)).toEqual([1, 2, 3, 255, 4, 5, 6, 0, 4, 5, 7, 255]);
    const ga = decodePng(pngBytes({ width: 2, height: 1, depth: 8, colorType: 4, samples: [50, 128, 200, 0] }));
    expect(Array.from(ga.data)).toEqual([50, 50, 50, 128, 200, 200, 200, 0]);
    const rgba16 = decodePng(pngBytes({ width: 1, height: 1, depth: 16, colorType: 6, samples: [65535, 0, 257 * 100, 257 * 7] }));
    expect(Array.from(rgba16.data)).toEqual([255, 0, 100, 7]);
  });

  it("bytes that are not a PNG raise PngError saying so", () => {
    expect(() => decodePng(new TextEncoder().encode("GIF89a not a png"))).toThrow(PngError);
    expect(() => decodePng(new Uint8Array(0))).toThrow(/not a readable PNG/);
  });
});
