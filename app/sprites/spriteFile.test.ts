import { encode } from "fast-png";
import { encodePng, type IndexedImage } from "@skewsmith/core";
import { spawnSync } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import sharp from "sharp";
import { chunk, ihdr, pngFile, readChunks, readIndexed, SIGNATURE, writeIndexed, writeRgba } from "../../tests/support/pngSpec.ts";
import { compassRose } from "../demo/art.ts";
import { decodeSprite, PNG_HEADER_BYTES, readPngHeader, SPRITE_MAX_BYTES } from "./spriteFile.ts";

/** decodeSprite's answer, which must be indexed here. */
function indexed(bytes: Uint8Array): IndexedImage {
  const image = decodeSprite(bytes);
  if (image.kind !== "indexed") throw new Error(`expected an indexed picture, got ${image.kind}`);
  return image;
}

const tiny: IndexedImage = {
  kind: "indexed",
  width: 3,
  height: 2,
  data: Uint8Array.from([0, 1, 2, 2, 1, 0]),
  palette: [
    [255, 0, 0, 255],
    [0, 0, 0, 0],
    [0, 0, 255, 255],
  ],
};

describe("sprite PNG files", () => {
  it("are written with chunks in the order the PNG specification requires, each with a correct CRC", () => {
    const chunks = readChunks(encodePng(compassRose(32)));
    const types = chunks.map((c) => c.type).filter((t) => t !== "IDAT");
    // PNG spec §5.6: IHDR first, PLTE before tRNS, tRNS before the first IDAT, IEND last.
    expect(types).toEqual(["IHDR", "PLTE", "tRNS", "IEND"]);
    expect(chunks.findIndex((c) => c.type === "tRNS")).toBeLessThan(chunks.findIndex((c) => c.type === "IDAT"));
    expect(chunks.every((c) => c.crcOk)).toBe(true);
  });

  it("hold indices and palette that a reader written from the specification reads back exactly", () => {
    const rose = compassRose(32);
    const file = readIndexed(encodePng(rose));
    expect([file.width, file.height]).toEqual([32, 32]);
    expect([...file.indices]).toEqual([...rose.data]);
    expect(file.plte).toEqual(rose.palette.map(([r, g, b]) => [r, g, b]));
  });

  it("keep a transparent entry that comes after an opaque one (PNG spec §11.3.2.1: tRNS alphas follow palette order)", () => {
    // fast-png alone writes only the translucent alphas, so entry 0 (opaque red) would read as transparent.
    const bare = readIndexed(
      encode({
        width: 2,
        height: 1,
        data: Uint8Array.from([0, 1]),
        depth: 8,
        channels: 1,
        palette: [
          [255, 0, 0, 255],
          [0, 0, 0, 0],
        ],
      }),
    );
    expect(bare.trns[0]).toBe(0);
    const file = readIndexed(encodePng(tiny));
    expect(file.trns).toEqual([255, 0]);
    expect(indexed(encodePng(tiny)).palette).toEqual(tiny.palette);
  });
});

describe("decodeSprite", () => {
  it("round-trips the demo sprite, transparency included", () => {
    const rose = compassRose(32);
    const back = indexed(encodePng(rose));
    expect([...back.data]).toEqual([...rose.data]);
    expect(back.palette).toEqual(rose.palette);
  });

  it("unpacks 4-bit and 1-bit indices from files written by hand per the specification", () => {
    const indices = [0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15, 15, 14, 13];
    const plte = Array.from({ length: 16 }, (_, i) => [i * 16, 255 - i * 16, i]);
    const four = indexed(writeIndexed(19, 1, 4, indices, plte, [0, 128]));
    expect([...four.data]).toEqual(indices);
    expect(four.palette[0]).toEqual([0, 255, 0, 0]);
    expect(four.palette[1]).toEqual([16, 239, 1, 128]);
    expect(four.palette[2][3]).toBe(255);

    const bits = [1, 0, 1, 1, 0, 0, 1, 0, 1, 1];
    const one = indexed(
      writeIndexed(5, 2, 1, bits, [
        [0, 0, 0],
        [255, 255, 255],
      ]),
    );
    expect([...one.data]).toEqual(bits);
  });
});

describe("decodeSprite's limits, checked before any pixel is decoded", () => {
  const pixels = (w: number, h: number) => Uint8Array.from({ length: w * h * 4 }, (_, i) => (i * 37) % 256);

  it("refuses a file over 4 MiB by its size alone, even when it starts like a good PNG", () => {
    const big = new Uint8Array(SPRITE_MAX_BYTES + 1);
    big.set(writeRgba(2, 2, pixels(2, 2)));
    expect(() => decodeSprite(big)).toThrow(`The file is ${SPRITE_MAX_BYTES + 1} bytes; sprites can be at most 4194304 bytes (4 MiB).`);
  });

  it("refuses declared dimensions beyond the core's 4096 from the IHDR header, without inflating the image data", () => {
    // The image data is not even deflate: had the decoder run, the message would be about that.
    const garbage = Buffer.from("not deflate data at all");
    for (const [width, height] of [
      [4097, 16],
      [16, 4097],
      [0x7fffffff, 0x7fffffff],
    ]) {
      const file = Buffer.concat([
        SIGNATURE,
        chunk("IHDR", ihdr({ width, height })),
        chunk("IDAT", garbage),
        chunk("IEND", Buffer.alloc(0)),
      ]);
      expect(() => decodeSprite(file)).toThrow(`The picture is ${width} × ${height} pixels; sprites can be at most 4096 × 4096`);
      expect(() => readPngHeader(file.subarray(0, PNG_HEADER_BYTES))).toThrow(/at most 4096 × 4096/);
    }
  });

  it("reads a header from its first 33 bytes alone, as the upload form does with a chosen file", () => {
    const file = writeRgba(3, 2, pixels(3, 2));
    expect(readPngHeader(file.subarray(0, PNG_HEADER_BYTES))).toEqual({
      width: 3,
      height: 2,
      bitDepth: 8,
      colourType: 6,
      interlaced: false,
      bitsPerPixel: 32,
      kind: "rgba",
    });
    expect(readPngHeader(encodePng(tiny).subarray(0, PNG_HEADER_BYTES)).kind).toBe("indexed");
  });

  it("refuses headers the PNG specification does not allow (§11.2.2, table 11.1)", () => {
    const raw = Buffer.alloc(2);
    expect(() => decodeSprite(pngFile(ihdr({ width: 0, height: 5 }), raw))).toThrow("declares 0 × 5 pixels");
    expect(() => decodeSprite(pngFile(ihdr({ width: 1, height: 1, colourType: 5 }), raw))).toThrow("colour type 5");
    expect(() => decodeSprite(pngFile(ihdr({ width: 1, height: 1, colourType: 2, depth: 4 }), raw))).toThrow(
      "4-bit samples for colour type 2; the PNG specification allows 8, 16",
    );
    expect(() => decodeSprite(pngFile(ihdr({ width: 1, height: 1, interlace: 2 }), raw))).toThrow("interlace method");
    const notFirst = Buffer.concat([SIGNATURE, chunk("tEXt", Buffer.from("a\0b")), chunk("IHDR", ihdr({ width: 1, height: 1 }))]);
    expect(() => decodeSprite(notFirst)).toThrow("its first chunk is not a 13-byte IHDR header");
  });

  it("names the kind of file when it is not a PNG (magic numbers from each format's published header)", () => {
    const cases: [number[] | string, RegExp][] = [
      [[0xff, 0xd8, 0xff, 0xe0, 0, 0x10], /looks like a JPEG picture/],
      ["GIF89a\x01\x00\x01\x00", /looks like a GIF picture/],
      ["RIFF\x10\x00\x00\x00WEBPVP8 ", /looks like a WebP picture/],
      ['<?xml version="1.0"?><svg xmlns="http://www.w3.org/2000/svg"/>', /looks like an SVG drawing/],
      ["just some text", /This is not a PNG file \(it does not start with the PNG signature\)/],
    ];
    for (const [content, message] of cases) {
      const bytes = typeof content === "string" ? new TextEncoder().encode(content) : Uint8Array.from(content);
      expect(() => decodeSprite(bytes)).toThrow(message);
    }
    expect(() => decodeSprite(new Uint8Array(0))).toThrow("The file is empty.");
  });

  it("refuses a file cut short anywhere, saying so, and never returns a partial picture", () => {
    const file = encodePng(compassRose(32));
    const cuts = [9, 20, 32, 33, 40, 60, file.length - 30, file.length - 13, file.length - 5];
    for (const cut of cuts) expect(() => decodeSprite(file.subarray(0, cut)), `cut at ${cut}`).toThrow(/cut short/);
    // A complete chunk layout whose image data stops early (PNG spec §10: the data must hold every row).
    const rows = Buffer.alloc(16 * (1 + 64));
    expect(() => decodeSprite(pngFile(ihdr({ width: 16, height: 16 }), rows.subarray(0, 300)))).toThrow(
      /image data: ends after 300 of the 1040 bytes/,
    );
  });

  it("stops inflating a decompression bomb as soon as it passes what the header allows", () => {
    // 16 × 16 RGBA needs 1040 bytes; 64 MB of zeros deflate to about 64 KB.
    const bomb = pngFile(ihdr({ width: 16, height: 16 }), Buffer.alloc(64_000_000));
    expect(bomb.length).toBeLessThan(SPRITE_MAX_BYTES);
    expect(() => decodeSprite(bomb)).toThrow("inflates to more than the 1040 bytes the declared size needs");
  });

  it("keeps the peak memory of a refused bomb near that of a tiny good file (peak RSS of a process of its own)", () => {
    // Each file is written here and decoded in a fresh Node process, which reports its peak resident memory
    // (getrusage's maxrss): the bomb (64 MB of zeros deflated to ~64 KB, declaring 16 × 16) against a good 16 × 16
    // PNG, in the same run.
    const dir = mkdtempSync(path.join(tmpdir(), "sprite-bomb-"));
    const files = {
      good: pngFile(ihdr({ width: 16, height: 16 }), Buffer.alloc(16 * (1 + 64))),
      bomb: pngFile(ihdr({ width: 16, height: 16 }), Buffer.alloc(64_000_000)),
    };
    const script = `
      import { readFileSync } from "node:fs";
      import { decodeSprite } from ${JSON.stringify(fileURLToPath(new URL("./spriteFile.ts", import.meta.url)))};
      const file = new Uint8Array(readFileSync(process.argv[1]));
      let refused = false;
      try { decodeSprite(file); } catch { refused = true; }
      process.stdout.write(JSON.stringify({ refused, peakKiB: process.resourceUsage().maxRSS }));`;
    const peak = (name: keyof typeof files) => {
      const file = path.join(dir, `${name}.png`);
      writeFileSync(file, files[name]);
      const out = spawnSync(process.execPath, ["--import", "tsx", "--input-type=module", "-e", script, file], { encoding: "utf8" });
      expect(out.status, out.stderr).toBe(0);
      return JSON.parse(out.stdout) as { refused: boolean; peakKiB: number };
    };
    try {
      const good = peak("good");
      const bomb = peak("bomb");
      expect(good.refused).toBe(false);
      expect(bomb.refused).toBe(true);
      console.log(
        `bomb peak RSS ${(bomb.peakKiB / 1024).toFixed(1)} MiB against a good file's ${(good.peakKiB / 1024).toFixed(1)} MiB ` +
          `(the bomb file is ${files.bomb.length} bytes and would inflate to 64 MB)`,
      );
      // Inflating the bomb whole adds its 64 MB and more (about 96 MiB measured with 32 KiB input pieces); the bounded
      // reader stops after one 4 KiB piece, whose output is at most about 4 MiB (measured: 10–17 MiB over the good
      // file, the inflater's buffers and the garbage collector's slack included). The bound is half the bomb.
      expect(bomb.peakKiB - good.peakKiB).toBeLessThan(32 * 1024);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it("refuses a palette PNG without a palette, and indices beyond the palette", () => {
    const raw = Buffer.from([0, 0x00]);
    expect(() => decodeSprite(pngFile(ihdr({ width: 1, height: 1, colourType: 3 }), raw))).toThrow(
      "PLTE: missing; a palette PNG (colour type 3) needs one",
    );
    const beyond = writeIndexed(
      2,
      1,
      8,
      [0, 3],
      [
        [0, 0, 0],
        [9, 9, 9],
      ],
    );
    expect(() => decodeSprite(beyond)).toThrow("uses palette index 3, but the palette has 2 colours");
  });
});

describe("decodeSprite reads RGBA and indexed PNGs from outside writers exactly", () => {
  it("keeps RGBA pixels written by a specification writer and by sharp (libvips), transparency included", async () => {
    const w = 5;
    const h = 3;
    const rgba = Uint8Array.from({ length: w * h * 4 }, (_, i) => (i % 4 === 3 ? [0, 128, 255][i % 3] : (i * 53) % 256));
    const ours = decodeSprite(writeRgba(w, h, rgba));
    expect(ours.kind).toBe("rgba");
    expect([...ours.data]).toEqual([...rgba]);
    const fromSharp = await sharp(Buffer.from(rgba), { raw: { width: w, height: h, channels: 4 } })
      .png()
      .toBuffer();
    expect([...decodeSprite(fromSharp).data]).toEqual([...rgba]);
    // Adam7-interlaced (sharp's "progressive" PNG): the header's expected size covers all seven passes (§8.2).
    const interlaced = await sharp(Buffer.from(rgba), { raw: { width: w, height: h, channels: 4 } })
      .png({ progressive: true })
      .toBuffer();
    expect(readPngHeader(interlaced).interlaced).toBe(true);
    expect([...decodeSprite(interlaced).data]).toEqual([...rgba]);
  });

  it("keeps a sharp palette PNG indexed, with sharp's own reading of its colours", async () => {
    const w = 4;
    const h = 2;
    const colours = [
      [200, 40, 40, 255],
      [40, 200, 40, 255],
    ];
    const rgba = Uint8Array.from(Array.from({ length: w * h }, (_, i) => colours[i % 2]).flat());
    const file = await sharp(Buffer.from(rgba), { raw: { width: w, height: h, channels: 4 } })
      .png({ palette: true, colours: 2, dither: 0 })
      .toBuffer();
    const image = decodeSprite(file);
    expect(image.kind).toBe("indexed");
    if (image.kind !== "indexed") return;
    const { data } = await sharp(file).ensureAlpha().raw().toBuffer({ resolveWithObject: true });
    expect([...image.data].flatMap((i) => [...image.palette[i]])).toEqual([...data]);
  });

  it("reads grey and 16-bit PNGs as 8-bit RGBA", async () => {
    const grey = await sharp(Buffer.from([0, 100, 200, 255]), { raw: { width: 2, height: 2, channels: 1 } })
      .png()
      .toBuffer();
    const image = decodeSprite(grey);
    expect(image.kind).toBe("rgba");
    expect([...image.data]).toEqual([0, 0, 0, 255, 100, 100, 100, 255, 200, 200, 200, 255, 255, 255, 255, 255]);
  });
});
