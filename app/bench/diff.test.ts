import { parseEffect } from "@skewsmith/core";
import { describe, expect, it } from "vitest";
import { stateToDraft, type BenchDraft } from "./draft.ts";
import { diffDrafts, mergeDrafts } from "./diff.ts";

const base: BenchDraft = stateToDraft({
  document: parseEffect({ canvas: { width: 32, height: 32 }, pivot: { x: 16, y: 16 }, angles: { list: [0, 10, 20] } }),
  targetProfileId: null,
  followsProfile: false,
  spriteId: null,
  spriteX: null,
  spriteY: null,
  keyPixels: [[1, 1]],
});

describe("what someone else changed", () => {
  it("lists each changed field with its value before and after, in words", () => {
    const theirs = {
      ...base,
      canvasWidth: "48",
      angleList: "0\n10\n25\n30",
      spriteX: "4",
      keyPixels: [
        [1, 1],
        [2, 2],
      ] as [number, number][],
    };
    expect(diffDrafts(base, theirs)).toEqual([
      { field: "canvasWidth", label: "Canvas width", before: "32", after: "48" },
      {
        field: "angleList",
        label: "Angle list",
        before: "3 angles: 0, 10, 20",
        after: "3 → 4 angles; angle 3: 20 → 25; angle 4: (none) → 30",
      },
      { field: "spriteX", label: "Sprite x", before: "centred", after: "4 px" },
      { field: "keyPixels", label: "Key pixels", before: "1 (1,1)", after: "2 (1,1; 2,2)" },
    ]);
  });

  it("ignores key pixels marked in another order and the fields of the other kind of track", () => {
    const a = {
      ...base,
      keyPixels: [
        [1, 1],
        [2, 2],
      ] as [number, number][],
      sweepFrom: "5",
    };
    const b = {
      ...base,
      keyPixels: [
        [2, 2],
        [1, 1],
      ] as [number, number][],
      sweepFrom: "9",
    };
    expect(diffDrafts(a, b)).toEqual([]);
  });
});

describe("keeping my edits on top of theirs", () => {
  it("takes their value where only they changed, mine where only I did, and keeps mine (flagged) where we both did", () => {
    const mine = { ...base, pivotX: "15.5", canvasHeight: "40" };
    const theirs = { ...base, rounding: "floor", canvasHeight: "48" };
    const merged = mergeDrafts(base, mine, theirs);
    expect(merged.draft).toMatchObject({ pivotX: "15.5", rounding: "floor", canvasHeight: "40" });
    expect(merged.clashes).toEqual(["canvasHeight"]);
  });

  it("does not flag a field we both changed to the same value", () => {
    const same = { ...base, edges: "clip" };
    expect(mergeDrafts(base, same, same).clashes).toEqual([]);
  });
});
