import { checkEffect, parseEffect } from "@skewsmith/core";
import { describe, expect, it } from "vitest";
import { draftToFields, stateToDraft, type BenchDraft, type BenchState } from "./draft.ts";
import { badLines, benchErrors, benchForm } from "./form.ts";

const state: BenchState = {
  document: parseEffect({
    canvas: { width: 32, height: 32 },
    pivot: { x: 16, y: 16 },
    angles: { sweep: { from: 0, to: 360, frames: 64 } },
  }),
  targetProfileId: null,
  followsProfile: false,
  spriteId: null,
  spriteX: null,
  spriteY: null,
  keyPixels: [],
};

function parse(patch: Partial<BenchDraft>) {
  const result = benchForm.safeParse(draftToFields({ ...stateToDraft(state), ...patch }));
  return result.success ? { ok: true as const, data: result.data } : { ok: false as const, errors: benchErrors(result.error) };
}

/** Core's own message for one bad field of an otherwise valid document. */
function coreMessage(patch: Record<string, unknown>, path: string): string {
  const result = checkEffect({ ...state.document, ...patch });
  if (result.ok) throw new Error("expected core to refuse");
  return result.issues.find((i) => i.path === path)!.message;
}

describe("the bench's settings form", () => {
  it("turns a saved state into a draft and back unchanged", () => {
    const result = parse({});
    expect(result.ok && result.data).toEqual(state);
    const list = { ...state, document: parseEffect({ ...state.document, angles: { list: [0, 12.5, -30] } }) };
    const back = benchForm.safeParse(draftToFields(stateToDraft(list)));
    expect(back.success && back.data.document.angles).toEqual({ list: [0, 12.5, -30] });
  });

  it("puts core's message beside the field it is about, quoting what was typed", () => {
    const result = parse({ canvasWidth: "5000", pivotX: "16.25", fixedPointFraction: "abc" });
    expect(result.ok).toBe(false);
    if (result.ok) return;
    expect(result.errors.canvasWidth).toBe(coreMessage({ canvas: { width: 5000, height: 32 } }, "canvas.width"));
    expect(result.errors.canvasWidth).toContain("allowed a whole number from 1 to 4096");
    expect(result.errors.pivotX).toContain("16.25 is not allowed; allowed a multiple of 0.5");
    expect(result.errors.fixedPointFraction).toBe('"abc" is not allowed; allowed a whole number from 0 to 31');
  });

  it("checks fields against each other as core does: fraction below bits, column group within the width", () => {
    const result = parse({ fixedPointBits: "8", fixedPointFraction: "8", columnGroup: "40" });
    expect(result.ok).toBe(false);
    if (result.ok) return;
    expect(result.errors.fixedPointFraction).toContain("below bits = 8");
    expect(result.errors.columnGroup).toContain("the canvas width");
  });

  it("marks every bad line of an angle list with its line number, skipping blank lines", () => {
    const result = parse({ angleMode: "list", angleList: "0\n\n15°\nabout 30\n45\n1e999\n" });
    expect(result.ok).toBe(false);
    if (result.ok) return;
    expect(badLines(result.errors)).toEqual([
      { line: 4, message: 'Line 4: "about 30" is not allowed; allowed a finite number of degrees' },
      { line: 6, message: "Line 6: Infinity is not allowed; allowed a finite number of degrees" },
    ]);
    const good = parse({ angleMode: "list", angleList: "0\n\n15°\n30 deg\n" });
    expect(good.ok && good.data.document.angles).toEqual({ list: [0, 15, 30] });
  });

  it("says an empty list or a list of more than 4096 angles is not allowed", () => {
    const empty = parse({ angleMode: "list", angleList: "\n \n" });
    expect(!empty.ok && empty.errors.angleList).toContain("allowed a list of 1 to 4096 angles");
    const long = parse({ angleMode: "list", angleList: Array.from({ length: 4097 }, (_, i) => String(i)).join("\n") });
    expect(!long.ok && long.errors.angleList).toBe("4097 angles is too many; allowed 1 to 4096");
  });

  it("checks the sprite placement and the key pixels", () => {
    const result = parse({ spriteX: "2.5", keyPixels: [[1, 2]] });
    expect(!result.ok && result.errors.spriteX).toContain("whole number of pixels");
    const ok = parse({
      spriteX: "-3",
      spriteY: "",
      keyPixels: [
        [1, 2],
        [1, 2],
        [3, 4],
      ],
    });
    expect(ok.ok && { x: ok.data.spriteX, y: ok.data.spriteY, keys: ok.data.keyPixels }).toEqual({
      x: -3,
      y: null,
      keys: [
        [1, 2],
        [3, 4],
      ],
    });
    const fields = { ...draftToFields(stateToDraft(state)), keyPixels: "[[1, 2.5]]" };
    const bad = benchForm.safeParse(fields);
    expect(!bad.success && benchErrors(bad.error).keyPixels).toContain("[x, y] pairs of whole pixel numbers");
  });

  it("follows a profile only when one is chosen", () => {
    const id = "8f14e45f-ceea-467a-9575-8a1b2b3c4d5e";
    expect(parse({ targetProfileId: id, followsProfile: true }).ok && parse({ targetProfileId: id, followsProfile: true })).toMatchObject({
      data: { targetProfileId: id, followsProfile: true },
    });
    const none = parse({ targetProfileId: "", followsProfile: true });
    expect(none.ok && none.data.followsProfile).toBe(false);
    expect(parse({ targetProfileId: "not-an-id" })).toMatchObject({
      ok: false,
      errors: { targetProfileId: "That target profile does not exist." },
    });
  });
});
