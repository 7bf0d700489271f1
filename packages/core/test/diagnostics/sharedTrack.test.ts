import { describe, expect, it } from "vitest";
import { diagnoseFrames, parseEffect, splitFrames } from "../../src/index.ts";
import {
  RANGE_DONE,
  RANGE_FAILED,
  measureHere,
  rangeState,
  settledRanges,
  sharedTrack,
  takeRanges,
} from "../../src/diagnostics/sharedTrack.ts";

const effect = parseEffect({
  canvas: { width: 40, height: 30 },
  pivot: { x: 20, y: 15 },
  angles: { sweep: { from: 0, to: 360, frames: 24 } },
});
const whole = diagnoseFrames(effect);

describe("a shared track", () => {
  it("holds every frame's figures, bit for bit those of one call, whichever taker measured which range", () => {
    const track = sharedTrack(splitFrames(24, 7));
    let calls = 0;
    // Two takers in turn, the first stopping after two ranges: the second takes the rest.
    const first = (range: { start: number; end: number }) => {
      if (++calls > 2) throw new Error("first taker gives up");
      return diagnoseFrames(effect, range);
    };
    takeRanges(track, first, true);
    expect(settledRanges(track)).toBe(7);
    const failed = track.ranges.map((_, i) => rangeState(track, i)).filter((s) => s === RANGE_FAILED).length;
    expect(failed).toBe(5);
    for (let i = 0; i < 7; i++) if (rangeState(track, i) === RANGE_FAILED) measureHere(track, i, (r) => diagnoseFrames(effect, r));
    expect(track.ranges.every((_, i) => rangeState(track, i) === RANGE_DONE)).toBe(true);
    expect(Array.from(track.meanErrorPx)).toEqual(Array.from(whole.meanErrorPx));
    expect(Array.from(track.maxErrorPx)).toEqual(Array.from(whole.maxErrorPx));
    expect(Array.from(track.wrapped)).toEqual(Array.from(whole.wrapped));
  });

  it("throws the asking thread's error and lets nobody take another range", () => {
    const track = sharedTrack(splitFrames(24, 6));
    expect(() =>
      takeRanges(
        track,
        () => {
          throw new RangeError("bad range");
        },
        false,
      ),
    ).toThrow("bad range");
    let taken = 0;
    takeRanges(track, (r) => (taken++, diagnoseFrames(effect, r)), true);
    expect(taken).toBe(0);
  });
});
