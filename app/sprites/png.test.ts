import { encode } from "fast-png";
import { encodePng, type IndexedImage } from "@skewsmith/core";
import { describe, expect, it } from "vitest";
import { readChunks, readIndexed, writeIndexed } from "../../tests/support/pngSpec.ts";
import { compassRose } from "../demo/art.ts";
import { decodeIndexedPng } from "./png.ts";

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
    expect(decodeIndexedPng(encodePng(tiny)).palette).toEqual(tiny.palette);
  });
});

describe("decodeIndexedPng", () => {
  it("round-trips the demo sprite, transparency included", () => {
    const rose = compassRose(32);
    const back = decodeIndexedPng(encodePng(rose));
    expect([...back.data]).toEqual([...rose.data]);
    expect(back.palette).toEqual(rose.palette);
  });

  it("unpacks 4-bit and 1-bit indices from files written by hand per the specification", () => {
    const indices = [0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15, 15, 14, 13];
    const plte = Array.from({ length: 16 }, (_, i) => [i * 16, 255 - i * 16, i]);
    const four = decodeIndexedPng(writeIndexed(19, 1, 4, indices, plte, [0, 128]));
    expect([...four.data]).toEqual(indices);
    expect(four.palette[0]).toEqual([0, 255, 0, 0]);
    expect(four.palette[1]).toEqual([16, 239, 1, 128]);
    expect(four.palette[2][3]).toBe(255);

    const bits = [1, 0, 1, 1, 0, 0, 1, 0, 1, 1];
    const one = decodeIndexedPng(
      writeIndexed(5, 2, 1, bits, [
        [0, 0, 0],
        [255, 255, 255],
      ]),
    );
    expect([...one.data]).toEqual(bits);
  });

  it("refuses a true-colour PNG with a message that says what to do", () => {
    const rgba = encode({ width: 1, height: 1, data: Uint8Array.from([1, 2, 3, 255]), depth: 8, channels: 4 });
    expect(() => decodeIndexedPng(rgba)).toThrow(/not indexed.*save it as an indexed-colour \(palette\) PNG/);
  });

  it("refuses bytes that are not a PNG", () => {
    expect(() => decodeIndexedPng(new TextEncoder().encode("GIF89a not a png"))).toThrow(/not a readable PNG/);
  });
});
