import { zlibSync } from "fflate";
import { crc32 } from "node:zlib";
import sharp, { type PngOptions } from "sharp";
import { describe, expect, it } from "vitest";
import * as baseline from "../bench/baseline/png.ts";
import { PngError, decodePng, encodePng, pngHeader, type Image, type IndexedImage, type Rgba, type RgbaImage } from "../src/index.ts";
import { decodePngInJs } from "../src/png.ts";
import { pngBytes, pngChunks } from "./helpers/pngBytes.ts";

/** Decodes a PNG with sharp (libvips/libspng), an outside reader, to RGBA bytes. */
async function sharpRgba(png: Uint8Array): Promise<number[]> {
  const { data } = await sharp(png).ensureAlpha().raw().toBuffer({ resolveWithObject: true });
  return Array.from(data);
}

/**
 * A 16-bit PNG as sharp reads it (16-bit RGBA samples), each rounded to the nearest 8-bit value, v·255/65535
 * (PNG specification §13.12, sample depth rescaling).
 */
async function sharpRgba16To8(png: Uint8Array): Promise<number[]> {
  const { data } = await sharp(png).toColourspace("rgb16").ensureAlpha().raw({ depth: "ushort" }).toBuffer({ resolveWithObject: true });
  return Array.from(new Uint16Array(data.buffer, data.byteOffset, data.length / 2), (v) => Math.round((v * 255) / 65535));
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

/** The same picture in the forms sharp (libvips/libspng) writes: palettes of 1 to 8 bits, grey, RGB, 16 bits, Adam7, adaptive filters. */
async function sharpForms(width: number, height: number): Promise<[string, Uint8Array][]> {
  const rgba = Buffer.alloc(width * height * 4);
  for (let i = 0; i < width * height; i++) {
    const x = i % width;
    const y = Math.floor(i / width);
    rgba.set([(x * 9) & 255, (y * 5) & 255, (x * y) & 255, (x + y) % 5 === 0 ? 0 : (x * 40) & 255 || 255], 4 * i);
  }
  const raw = () => sharp(rgba, { raw: { width, height, channels: 4 } });
  const forms: [string, Promise<Buffer>][] = [
    ["RGBA", raw().png({ adaptiveFiltering: true }).toBuffer()],
    ["RGBA, Adam7", raw().png({ progressive: true, adaptiveFiltering: true }).toBuffer()],
    ["RGB", raw().removeAlpha().png({ adaptiveFiltering: true }).toBuffer()],
    ["grey", raw().removeAlpha().greyscale().png({ adaptiveFiltering: true }).toBuffer()],
    ["grey + alpha", raw().greyscale().png().toBuffer()],
    ["RGBA, 16 bits", raw().toColourspace("rgb16").png().toBuffer()],
    ["grey, 16 bits, Adam7", raw().removeAlpha().toColourspace("grey16").png({ progressive: true }).toBuffer()],
  ];
  for (const bitdepth of [1, 2, 4, 8] as const) {
    // sharp takes `bitdepth` for palettes (its documentation), though its type declarations leave it out.
    const palette = (progressive: boolean) => ({ palette: true, colours: 2 ** bitdepth, bitdepth, progressive }) as PngOptions;
    forms.push([`palette, ${bitdepth} bits`, raw().png(palette(false)).toBuffer()]);
    forms.push([`palette, ${bitdepth} bits, Adam7`, raw().png(palette(true)).toBuffer()]);
  }
  const out = await Promise.all(forms.map(async ([name, png]) => [name, new Uint8Array(await png)] as [string, Uint8Array]));
  for (const [name, png] of out) {
    const depth = /(\d+) bits/.exec(name)?.[1];
    if (depth) expect(pngHeader(png).bitDepth, name).toBe(Number(depth)); // the form really is what its name says
  }
  return out;
}

describe("decodePng reads what outside readers read", () => {
  it("every form sharp writes, 37 × 23 pixels (odd sizes: partial bytes and partial Adam7 passes), as sharp reads it back", async () => {
    for (const [name, png] of await sharpForms(37, 23)) {
      const image = decodePng(png);
      expect(image.kind, name).toBe(pngHeader(png).kind);
      const rgba = image.kind === "indexed" ? lookup(image) : Array.from(image.data);
      expect(rgba, name).toEqual(pngHeader(png).bitDepth === 16 ? await sharpRgba16To8(png) : await sharpRgba(png));
    }
  });

  it("every non-interlaced form exactly as the earlier reader (fast-png's decoder, kept in bench/baseline) read it", async () => {
    for (const [name, png] of await sharpForms(37, 23)) {
      if (pngHeader(png).interlaced) continue; // fast-png 8 misreads interlaced palettes of fewer than 8 bits
      expect(decodePng(png), name).toEqual(baseline.decodePng(png));
    }
  });

  it("every form sharp writes reads the same through Node's zlib and through fflate in JavaScript", async () => {
    for (const [name, png] of await sharpForms(37, 23)) expect(decodePngInJs(png), name).toEqual(decodePng(png));
  });
});

describe("encodePng writes the same bytes as the earlier writer (fast-png's encoder with its tRNS fixed)", () => {
  it.each([
    ["RGBA", 64, 48],
    ["indexed", 64, 48],
    ["indexed", 1, 1],
    ["RGBA", 1920, 3],
  ] as const)("%s, %i × %i", (kind, width, height) => {
    const n = width * height;
    const image: Image =
      kind === "RGBA"
        ? { kind: "rgba", width, height, data: Uint8Array.from({ length: 4 * n }, (_, i) => (i * 31 + (i >> 7)) & 255) }
        : {
            kind: "indexed",
            width,
            height,
            data: Uint8Array.from({ length: n }, (_, i) => (i * 7) % 5),
            palette: [
              [1, 2, 3, 255],
              [0, 0, 0, 0],
              [9, 9, 9, 255],
              [4, 5, 6, 128],
              [7, 7, 7, 255],
            ],
          };
    const png = encodePng(image);
    expect(Buffer.from(png).equals(Buffer.from(baseline.encodePng(image)))).toBe(true);
    expect(decodePng(png)).toEqual(image);
  });
});

describe("a decoded picture owns its pixels' buffer", () => {
  // Node hands out small buffers as slices of one shared pool (Node's Buffer documentation, "Buffer.poolSize"): a
  // picture whose pixels sat in it would share its buffer with unrelated data.
  for (const [width, height] of [
    [1, 1],
    [4, 4],
    [16, 16],
    [64, 64],
  ]) {
    it(`${width} × ${height}, RGBA and indexed`, () => {
      const rgba: RgbaImage = { kind: "rgba", width, height, data: new Uint8Array(width * height * 4).map((_, i) => (i * 37) & 255) };
      const palette: Rgba[] = [
        [0, 0, 0, 0],
        [200, 40, 40, 255],
      ];
      const indexed: IndexedImage = { kind: "indexed", width, height, data: new Uint8Array(width * height).map((_, i) => i & 1), palette };
      for (const image of [rgba, indexed]) {
        const decoded = decodePng(encodePng(image));
        expect(decoded.data).toEqual(image.data);
        expect(decoded.data.byteOffset).toBe(0);
        expect(decoded.data.buffer.byteLength).toBeLessThanOrEqual(decoded.data.byteLength + height + 1);
      }
    });
  }
});

describe("pngHeader reads only the signature and IHDR", () => {
  it("gives the declared size, depth and colour type, even of a file cut right after IHDR", async () => {
    const png = new Uint8Array(
      await sharp({ create: { width: 300, height: 17, channels: 3, background: "#123456" } })
        .png()
        .toBuffer(),
    );
    expect(pngHeader(png.subarray(0, 33))).toEqual({ width: 300, height: 17, bitDepth: 8, colorType: 2, interlaced: false, kind: "rgba" });
    const indexed = encodePng({ kind: "indexed", width: 2, height: 3, data: new Uint8Array(6), palette: [[0, 0, 0, 0]] });
    expect(pngHeader(indexed)).toMatchObject({ width: 2, height: 3, colorType: 3, kind: "indexed" });
  });

  it("reports a size beyond the canvas limit without refusing it (the caller decides); decodePng refuses it", () => {
    const png = withIhdr(encodePng({ kind: "rgba", width: 1, height: 1, data: new Uint8Array(4) }), 5000, 1);
    expect(pngHeader(png)).toMatchObject({ width: 5000, height: 1 });
    expect(() => decodePng(png)).toThrow(/5000×1 pixels; allowed at most 4096×4096/);
  });
});

/** A PNG with its IHDR width and height replaced (CRC recomputed), its image data left as it was. */
function withIhdr(png: Uint8Array, width: number, height: number): Uint8Array {
  const out = png.slice();
  const view = new DataView(out.buffer);
  view.setUint32(16, width);
  view.setUint32(20, height);
  view.setUint32(29, crc32(out.subarray(12, 29)));
  return out;
}

/** A PNG made of the given chunks after the signature, each with its CRC (PNG specification §5.3). */
function pngOf(...chunks: [string, Uint8Array][]): Uint8Array {
  const parts = chunks.map(([type, body]) => {
    const c = Buffer.alloc(12 + body.length);
    c.writeUInt32BE(body.length, 0);
    c.write(type, 4, "latin1");
    c.set(body, 8);
    c.writeUInt32BE(crc32(c.subarray(4, 8 + body.length)), 8 + body.length);
    return c;
  });
  return new Uint8Array(Buffer.concat([Buffer.from([137, 80, 78, 71, 13, 10, 26, 10]), ...parts]));
}

function ihdr(width: number, height: number, depth: number, colorType: number, interlace = 0): [string, Uint8Array] {
  const b = Buffer.alloc(13);
  b.writeUInt32BE(width, 0);
  b.writeUInt32BE(height, 4);
  b.set([depth, colorType, 0, 0, interlace], 8);
  return ["IHDR", b];
}

describe.each([
  ["Node's zlib (the command line, the app's server)", decodePng],
  ["fflate in JavaScript (a platform without Node's zlib)", decodePngInJs],
])("hostile PNGs are refused with a PngError and a clear message, before their image data is inflated: %s", (_, decodePng) => {
  const good = encodePng({ kind: "rgba", width: 20, height: 10, data: Uint8Array.from({ length: 800 }, (_, i) => i & 255) });

  it("every truncation of a valid file, at any byte, is a PngError (never another error, never a picture)", () => {
    for (let n = 0; n < good.length; n++) expect(() => decodePng(good.subarray(0, n)), `${n} bytes`).toThrow(PngError);
    expect(() => decodePng(good.subarray(0, 40))).toThrow(/truncated/);
  });

  it("a wrong byte in any chunk fails that chunk's CRC", () => {
    for (const [at, chunk] of [
      [20, "IHDR"],
      [45, "IDAT"],
      [good.length - 5, "IEND"],
    ] as const) {
      const bad = good.slice();
      bad[at] ^= 0x10;
      expect(() => decodePng(bad)).toThrow(new RegExp(`${chunk}.*bad CRC|bad CRC`));
    }
  });

  it("a declared size beyond 4096 is refused before the image data is even read", () => {
    // The IDAT is not valid zlib data at all: the size alone decides.
    const png = pngOf(ihdr(4097, 4097, 8, 6), ["IDAT", Uint8Array.from([1, 2, 3])], ["IEND", new Uint8Array(0)]);
    expect(() => decodePng(png)).toThrow(/4097×4097 pixels; allowed at most 4096×4096/);
  });

  it("a decompression bomb (64 MiB of zeros declared as 16 × 16) stops once the declared size is exceeded", () => {
    const bomb = zlibSync(new Uint8Array(64 << 20), { level: 6 });
    expect(bomb.length).toBeLessThan(100_000);
    const png = pngOf(ihdr(16, 16, 8, 6), ["IDAT", bomb], ["IEND", new Uint8Array(0)]);
    const before = process.memoryUsage().arrayBuffers;
    expect(() => decodePng(png)).toThrow(/inflates to more than the 1040 bytes the declared size needs/);
    // Bounded memory: far less than the 64 MiB the bomb holds stays allocated (checked after, not timed).
    expect(process.memoryUsage().arrayBuffers - before).toBeLessThan(40 << 20);
  });

  it("image data that ends early, is not zlib data, or uses an unknown filter type is refused", () => {
    const rows = new Uint8Array(4 * (1 + 4 * 4));
    const short = pngOf(ihdr(4, 4, 8, 6), ["IDAT", zlibSync(rows.subarray(0, 40))], ["IEND", new Uint8Array(0)]);
    expect(() => decodePng(short)).toThrow(/ends after 40 of the 68 bytes/);
    const garbage = pngOf(
      ihdr(4, 4, 8, 6),
      ["IDAT", Uint8Array.from([0x78, 0x9c, 0xff, 0xff, 0xff, 0xff, 0, 0])],
      ["IEND", new Uint8Array(0)],
    );
    expect(() => decodePng(garbage)).toThrow(PngError);
    const filtered = rows.slice();
    filtered[17] = 5;
    const filter5 = pngOf(ihdr(4, 4, 8, 6), ["IDAT", zlibSync(filtered)], ["IEND", new Uint8Array(0)]);
    expect(() => decodePng(filter5)).toThrow(/scanline 1 uses filter type 5; allowed 0 to 4/);
  });

  it("a bad header, a missing palette, misplaced chunks and a missing end are refused, each naming what is wrong", () => {
    const idat = (bytes: number): [string, Uint8Array] => ["IDAT", zlibSync(new Uint8Array(bytes))];
    const end: [string, Uint8Array] = ["IEND", new Uint8Array(0)];
    const cases: [Uint8Array, RegExp][] = [
      [new TextEncoder().encode("GIF89a not a png at all, not at all"), /no PNG signature/],
      [pngOf(ihdr(4, 4, 3, 6), idat(20), end), /bit depth 3 is not allowed for colour type 6/],
      [pngOf(ihdr(4, 4, 8, 5), idat(20), end), /colour type 5 is not allowed/],
      [pngOf(ihdr(0, 4, 8, 6), idat(20), end), /0×4 pixels is not allowed/],
      [pngOf(ihdr(4, 4, 8, 6, 2), idat(20), end), /interlace method 2/],
      [pngOf(ihdr(2, 2, 8, 3), idat(6), end), /PLTE: missing/],
      [pngOf(ihdr(2, 2, 8, 3), ["PLTE", new Uint8Array(4)], idat(6), end), /PLTE: 4 bytes is not allowed/],
      [
        pngOf(ihdr(2, 2, 8, 3), ["PLTE", new Uint8Array(3)], ["tRNS", new Uint8Array(2)], idat(6), end),
        /tRNS: 2 alpha values for a palette of 1/,
      ],
      [pngOf(ihdr(2, 2, 8, 6), ["tRNS", new Uint8Array(2)], idat(18), end), /tRNS: not allowed for colour type 6/],
      [pngOf(ihdr(2, 2, 8, 6), end), /no image data/],
      [pngOf(ihdr(2, 2, 8, 6), idat(18)), /truncated/],
      [pngOf(["IDAT", new Uint8Array(13)]), /first chunk is IDAT, not IHDR/],
    ];
    for (const [png, message] of cases) {
      expect(() => decodePng(png), String(message)).toThrow(PngError);
      expect(() => decodePng(png), String(message)).toThrow(message);
    }
  });
});
