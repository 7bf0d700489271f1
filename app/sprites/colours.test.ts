import { describe, expect, it } from "vitest";
import { spriteColours, tooManyColours } from "./colours.ts";

// Hand-built pictures whose colours are counted by construction (no other source: the count is the definition).
describe("spriteColours", () => {
  it("counts the palette entries the pixels use, the background always, and one colour once", () => {
    const palette = [
      [0, 0, 0, 0],
      [255, 0, 0, 255],
      [0, 255, 0, 255],
      [255, 0, 0, 255], // the same red again
      [0, 0, 255, 255], // never used
    ] as const;
    const image = { kind: "indexed" as const, width: 2, height: 2, data: new Uint8Array([1, 2, 3, 1]), palette };
    expect(spriteColours(image)).toBe(3); // background, red, green
    expect(spriteColours({ ...image, data: new Uint8Array([1, 1, 1, 1]) })).toBe(2);
  });

  it("counts the distinct RGBA values of a true-colour picture, with transparent black as the background", () => {
    const px = (...c: number[][]) => new Uint8Array(c.flat());
    const image = { kind: "rgba" as const, width: 3, height: 1, data: px([10, 20, 30, 255], [10, 20, 30, 255], [10, 20, 30, 128]) };
    expect(spriteColours(image)).toBe(3);
    expect(spriteColours({ ...image, data: px([0, 0, 0, 0], [1, 1, 1, 255], [0, 0, 0, 0]) })).toBe(2);
  });

  it("names the sprite, its count, the profile and the limit", () => {
    const message = tooManyColours({ sprite: "emblem.png", colours: 6, profile: "Handheld", limit: 4, effect: "Title spin" });
    expect(message).toContain("emblem.png uses 6 colours");
    expect(message).toContain("Title spin is made for the target profile Handheld, which allows at most 4");
    expect(tooManyColours({ sprite: "emblem.png", colours: 6, profile: "Handheld", limit: 4 })).toContain(
      "emblem.png uses 6 colours (the background included); the target profile Handheld allows at most 4.",
    );
  });
});
