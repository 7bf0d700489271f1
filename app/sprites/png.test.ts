import { encode } from "fast-png";
import { describe, expect, it } from "vitest";
import { readChunks, readIndexed, writeIndexed } from "../../tests/support/pngSpec.ts";
import { compassRose } from "../demo/art.ts";
import { decodeIndexedPng, encodeIndexedPng, type IndexedImage } from "./png.ts";

const tiny: IndexedImage = {
  width: 3,
  height: 2,
  indices: Uint8Array.from([0, 1, 2, 2, 1, 0]),
  palette: [
    [0, 0, 0, 0],
    [255, 0, 0, 255],
    [0, 0, 255, 255],
  ],
};

describe("encodeIndexedPng", () => {
  it("writes chunks in the order the PNG specification requires, each with a correct CRC", () => {
    const chunks = readChunks(encodeIndexedPng(compassRose(32)));
    const types = chunks.map((c) => c.type).filter((t) => t !== "IDAT");
    // PNG spec §5.6: IHDR first, PLTE before tRNS, tRNS before the first IDAT, IEND last.
    expect(types).toEqual(["IHDR", "PLTE", "tRNS", "IEND"]);
    expect(chunks.findIndex((c) => c.type === "tRNS")).toBeLessThan(chunks.findIndex((c) => c.type === "IDAT"));
    expect(chunks.every((c) => c.crcOk)).toBe(true);
  });

  it("stores indices and palette that a reader written from the specification reads back exactly", () => {
    const rose = compassRose(32);
    const file = readIndexed(encodeIndexedPng(rose));
    expect(file.width).toBe(32);
    expect(file.height).toBe(32);
    expect([...file.indices]).toEqual([...rose.indices]);
    expect(file.plte).toEqual(rose.palette.map(([r, g, b]) => [r, g, b]));
  });

  it("writes the transparent entry's alpha in tRNS at index 0 (spec §11.3.2.1: tRNS alphas follow palette order)", () => {
    const file = readIndexed(encodeIndexedPng(tiny));
    // Only entry 0 is translucent, so tRNS holds one alpha: 0. Entries beyond tRNS are opaque.
    expect(file.trns).toEqual([0]);
  });

  it("writes no tRNS for an opaque palette", () => {
    const opaque = { ...tiny, palette: tiny.palette.map(([r, g, b]) => [r, g, b, 255] as [number, number, number, number]) };
    expect(readChunks(encodeIndexedPng(opaque)).map((c) => c.type)).not.toContain("tRNS");
  });

  it("refuses a translucent entry after an opaque one instead of writing a wrong tRNS", () => {
    const bad = { ...tiny, palette: [tiny.palette[1], tiny.palette[0], tiny.palette[2]] };
    expect(() => encodeIndexedPng(bad)).toThrow(/palette\[1\] is translucent but comes after opaque palette\[0\]/);
  });

  it("shows why the refusal matters: fast-png alone would mark the wrong entry transparent", () => {
    // Same picture with the transparent colour at index 1; fast-png's tRNS then gives index 0 the alpha of index 1.
    const file = readIndexed(
      encode({ width: 2, height: 1, data: Uint8Array.from([0, 1]), depth: 8, channels: 1, palette: [[255, 0, 0, 255], [0, 0, 0, 0]] }),
    );
    expect(file.trns[0]).toBe(0); // index 0 (opaque red) reads as transparent: the bug we guard against.
  });

  it("names the bad field when the input is wrong", () => {
    expect(() => encodeIndexedPng({ ...tiny, indices: Uint8Array.from([0, 1, 3, 0, 0, 0]) })).toThrow(/uses index 3; the palette has 3 entries/);
    expect(() => encodeIndexedPng({ ...tiny, indices: new Uint8Array(5) })).toThrow(/needs 6/);
    expect(() => encodeIndexedPng({ ...tiny, palette: [[0, 0, 0, 300]] as never })).toThrow(/palette\[0\]/);
  });
});

describe("decodeIndexedPng", () => {
  it("round-trips what encodeIndexedPng wrote, transparency included", () => {
    const rose = compassRose(32);
    const back = decodeIndexedPng(encodeIndexedPng(rose));
    expect([...back.indices]).toEqual([...rose.indices]);
    expect(back.palette).toEqual(rose.palette);
  });

  it("unpacks 4-bit and 1-bit indices from files written by hand per the specification", () => {
    const indices = [0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15, 15, 14, 13];
    const plte = Array.from({ length: 16 }, (_, i) => [i * 16, 255 - i * 16, i]);
    const four = decodeIndexedPng(writeIndexed(19, 1, 4, indices, plte, [0, 128]));
    expect([...four.indices]).toEqual(indices);
    expect(four.palette[0]).toEqual([0, 255, 0, 0]);
    expect(four.palette[1]).toEqual([16, 239, 1, 128]);
    expect(four.palette[2][3]).toBe(255);

    const bits = [1, 0, 1, 1, 0, 0, 1, 0, 1, 1];
    const one = decodeIndexedPng(writeIndexed(5, 2, 1, bits, [[0, 0, 0], [255, 255, 255]]));
    expect([...one.indices]).toEqual(bits);
  });

  it("refuses a true-colour PNG with a message that says what to do", () => {
    const rgba = encode({ width: 1, height: 1, data: Uint8Array.from([1, 2, 3, 255]), depth: 8, channels: 4 });
    expect(() => decodeIndexedPng(rgba)).toThrow(/not indexed.*save it as an indexed-colour \(palette\) PNG/);
  });

  it("refuses bytes that are not a PNG", () => {
    expect(() => decodeIndexedPng(new TextEncoder().encode("GIF89a not a png"))).toThrow(/not a readable PNG/);
  });
});
