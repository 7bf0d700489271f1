import { describe, expect, it } from "vitest";
import { angleTrack } from "../src/index.ts";
import { expectClose } from "./helpers/expectClose.ts";

const sweep = (from: number, to: number, frames: number, easing: "linear" | "ease-in-out", includeEnd: boolean) => ({
  sweep: { from, to, frames, easing, includeEnd },
});

function expectAngles(actual: number[], expected: number[]) {
  expect(actual).toHaveLength(expected.length);
  expected.forEach((e, i) => expectClose(actual[i], e, 1e-9, `frame ${i}`));
}

describe("angleTrack (spec §2)", () => {
  it("a list gives its own angles, in order, unnormalised", () => {
    expect(angleTrack({ list: [0, 370, -45.5, 540] })).toEqual([0, 370, -45.5, 540]);
  });

  it("a linear sweep without its end steps by (to − from)/n: 0 → 360 in 8 frames is 0, 45, …, 315", () => {
    expectAngles(angleTrack(sweep(0, 360, 8, "linear", false)), [0, 45, 90, 135, 180, 225, 270, 315]);
  });

  it("a linear sweep with its end steps by (to − from)/(n − 1): 0 → 90 in 4 frames is 0, 30, 60, 90", () => {
    expectAngles(angleTrack(sweep(0, 90, 4, "linear", true)), [0, 30, 60, 90]);
  });

  it("sweeps run backwards too: 90 → −90 in 3 frames with the end is 90, 0, −90", () => {
    expectAngles(angleTrack(sweep(90, -90, 3, "linear", true)), [90, 0, -90]);
  });

  it("ease-in-out follows E(t) = (1 − cos πt)/2: 0 → 180 in 5 frames with the end (derived by hand)", () => {
    // t = 0, 1/4, 1/2, 3/4, 1 → E = 0, (1 − √2/2)/2, 1/2, (1 + √2/2)/2, 1.
    const h = Math.SQRT2 / 2;
    expectAngles(angleTrack(sweep(0, 180, 5, "ease-in-out", true)), [0, 90 * (1 - h), 90, 90 * (1 + h), 180]);
  });

  it("ease-in-out without the end stops short of it: 0 → 100 in 2 frames is 0, 50", () => {
    expectAngles(angleTrack(sweep(0, 100, 2, "ease-in-out", false)), [0, 50]);
  });

  it("one frame is the start angle whether or not the end is included (n = 1 gives t = 0)", () => {
    expect(angleTrack(sweep(12, 99, 1, "linear", true))).toEqual([12]);
    expect(angleTrack(sweep(12, 99, 1, "linear", false))).toEqual([12]);
    expect(angleTrack(sweep(12, 99, 1, "ease-in-out", true))).toEqual([12]);
  });

  it("4096 frames, the most allowed, are all produced", () => {
    const a = angleTrack(sweep(0, 360, 4096, "linear", false));
    expect(a).toHaveLength(4096);
    expectClose(a[4095], (360 * 4095) / 4096, 1e-9);
  });
});
