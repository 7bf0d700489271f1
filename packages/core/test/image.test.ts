import { describe, expect, it } from "vitest";
import { imageFromPlane, imagePlane, opaqueMask, placeImage, type IndexedImage, type Rgba, type RgbaImage } from "../src/index.ts";

const palette: Rgba[] = [
  [0, 0, 0, 0],
  [255, 0, 0, 255],
  [0, 255, 0, 255],
];

describe("image planes", () => {
  it("an indexed image's plane is its index bytes", () => {
    const image: IndexedImage = { kind: "indexed", width: 2, height: 2, data: Uint8Array.from([0, 1, 2, 1]), palette };
    expect(imagePlane(image)).toBe(image.data);
  });

  it("an RGBA image's plane has one 32-bit word per pixel holding its four bytes, with or without word alignment", () => {
    const bytes = Uint8Array.from([1, 2, 3, 4, 0, 0, 0, 0, 9, 8, 7, 6]);
    const aligned: RgbaImage = { kind: "rgba", width: 3, height: 1, data: bytes };
    const buffer = new Uint8Array(13);
    buffer.set(bytes, 1);
    const unaligned: RgbaImage = { kind: "rgba", width: 3, height: 1, data: buffer.subarray(1) };
    for (const image of [aligned, unaligned]) {
      const plane = imagePlane(image);
      expect(plane).toHaveLength(3);
      expect(Array.from(new Uint8Array(plane.buffer, plane.byteOffset, 12))).toEqual(Array.from(bytes));
      expect(plane[1]).toBe(0); // transparent black is the background value 0
    }
  });

  it("imageFromPlane makes an image of the same kind, palette kept, pixels copied", () => {
    const indexed: IndexedImage = { kind: "indexed", width: 3, height: 1, data: Uint8Array.from([1, 2, 0]), palette };
    const plane = Uint8Array.from([2, 0, 1]);
    const out = imageFromPlane(indexed, plane) as IndexedImage;
    expect(out).toEqual({ ...indexed, data: plane });
    plane[0] = 1;
    expect(out.data[0]).toBe(2);
    const rgba: RgbaImage = { kind: "rgba", width: 1, height: 2, data: Uint8Array.from([1, 2, 3, 4, 5, 6, 7, 8]) };
    expect(imageFromPlane(rgba, imagePlane(rgba))).toEqual(rgba);
  });
});

describe("opaqueMask: which pixels are not background", () => {
  it("is 1 for palette indices other than 0, whatever index 0's colour", () => {
    const image: IndexedImage = { kind: "indexed", width: 4, height: 1, data: Uint8Array.from([0, 1, 2, 0]), palette };
    expect(Array.from(opaqueMask(image))).toEqual([0, 1, 1, 0]);
  });

  it("is 1 for RGBA pixels with alpha above 0", () => {
    const image: RgbaImage = { kind: "rgba", width: 3, height: 1, data: Uint8Array.from([9, 9, 9, 0, 0, 0, 0, 1, 0, 0, 0, 255]) };
    expect(Array.from(opaqueMask(image))).toEqual([0, 1, 1]);
  });
});

describe("placeImage: a sprite into a canvas", () => {
  const sprite: IndexedImage = { kind: "indexed", width: 2, height: 2, data: Uint8Array.from([1, 2, 2, 1]), palette };

  it("puts the sprite's top-left corner at (x, y), background elsewhere, palette kept", () => {
    expect(placeImage(sprite, 4, 3, 1, 1)).toEqual({
      ...sprite,
      width: 4,
      height: 3,
      data: Uint8Array.from([0, 0, 0, 0, 0, 1, 2, 0, 0, 2, 1, 0]),
    });
  });

  it("cuts what falls outside the canvas, on every side", () => {
    expect(Array.from(placeImage(sprite, 2, 2, -1, -1).data)).toEqual([1, 0, 0, 0]);
    expect(Array.from(placeImage(sprite, 2, 2, 1, 1).data)).toEqual([0, 0, 0, 1]);
    expect(Array.from(placeImage(sprite, 2, 2, 5, 0).data)).toEqual([0, 0, 0, 0]);
  });

  it("places RGBA sprites four bytes a pixel", () => {
    const rgba: RgbaImage = { kind: "rgba", width: 1, height: 1, data: Uint8Array.from([1, 2, 3, 4]) };
    expect(placeImage(rgba, 2, 1, 1, 0)).toEqual({ kind: "rgba", width: 2, height: 1, data: Uint8Array.from([0, 0, 0, 0, 1, 2, 3, 4]) });
  });
});
