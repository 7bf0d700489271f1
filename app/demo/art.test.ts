import { describe, expect, it } from "vitest";
import { COMPASS_PALETTE, compassRose, stormBackground } from "./art.ts";

const at = (img: ReturnType<typeof compassRose>, x: number, y: number) => img.data[y * img.width + x];

describe("compassRose", () => {
  const rose = compassRose(32);

  it("is a 32 × 32 indexed picture whose corners are transparent", () => {
    expect([rose.width, rose.height, rose.data.length]).toEqual([32, 32, 1024]);
    expect([at(rose, 0, 0), at(rose, 31, 0), at(rose, 0, 31), at(rose, 31, 31)]).toEqual([0, 0, 0, 0]);
    expect(rose.palette[0][3]).toBe(0);
    expect(Math.max(...rose.data)).toBeLessThan(COMPASS_PALETTE.length);
  });

  it("marks north only: the north colour sits above the centre and nowhere below it", () => {
    const north = COMPASS_PALETTE.findIndex((c) => c[0] === 196 && c[1] === 72);
    let above = 0;
    let below = 0;
    for (let y = 0; y < 32; y++) for (let x = 0; x < 32; x++) if (at(rose, x, y) === north) y < 16 ? above++ : below++;
    expect(above).toBeGreaterThan(10);
    expect(below).toBe(0);
  });

  it("has its long points on the axes: the east and west tips are drawn, the corners of the ring are not", () => {
    expect(at(rose, 29, 16)).not.toBe(0);
    expect(at(rose, 2, 16)).not.toBe(0);
    expect(at(rose, 16, 29)).not.toBe(0);
  });

  it("draws the same picture every time (the seed must be repeatable)", () => {
    expect([...compassRose(32).data]).toEqual([...rose.data]);
  });
});

describe("stormBackground", () => {
  it("fills a 256 × 224 screen with opaque colours only, index 0 being the transparent background it never uses", () => {
    const storm = stormBackground();
    expect([storm.width, storm.height]).toEqual([256, 224]);
    expect(storm.palette[0]).toEqual([0, 0, 0, 0]);
    expect(storm.palette.slice(1).every((c) => c[3] === 255)).toBe(true);
    expect(Math.min(...storm.data)).toBeGreaterThan(0);
    expect(Math.max(...storm.data)).toBeLessThan(storm.palette.length);
    // Sky above, sea below: the top row and the bottom row share no colour.
    const top = new Set(storm.data.subarray(0, 256));
    const bottom = new Set(storm.data.subarray(223 * 256));
    expect([...top].filter((c) => bottom.has(c))).toEqual([]);
  });
});
