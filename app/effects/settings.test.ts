import { checkEffect, EFFECT_FORMAT, parseEffect } from "@skewsmith/core";
import { describe, expect, it } from "vitest";
import { describeAngles, qNotation } from "./display.ts";
import { newEffectDocument, targetProfileInput } from "./settings.ts";
import { PROFILE_FORM } from "../../tests/factories.ts";

describe("newEffectDocument", () => {
  it("is a valid 64 × 64 effect with the pivot at the centre and a 64-frame full turn, core's defaults elsewhere", () => {
    const doc = newEffectDocument();
    expect(checkEffect(doc).ok).toBe(true);
    expect(doc).toEqual(
      parseEffect({
        canvas: { width: 64, height: 64 },
        pivot: { x: 32, y: 32 },
        angles: { sweep: { from: 0, to: 360, frames: 64 } },
      }),
    );
    expect(doc.format).toBe(EFFECT_FORMAT);
  });

  it("takes canvas and arithmetic from a target profile and centres the pivot on odd sizes at a half pixel", () => {
    const doc = newEffectDocument({
      canvasWidth: 255,
      canvasHeight: 9,
      fixedPointBits: 8,
      fixedPointFraction: 7,
      rounding: "floor",
      halfTurn: "shear",
      edges: "clip",
      columnGroup: 8,
    });
    expect(doc.canvas).toEqual({ width: 255, height: 9 });
    expect(doc.pivot).toEqual({ x: 127.5, y: 4.5 });
    expect(doc.fixedPoint).toEqual({ bits: 8, fraction: 7 });
    expect([doc.rounding, doc.halfTurn, doc.edges, doc.columnGroup]).toEqual(["floor", "shear", "clip", 8]);
  });

  it("lets core refuse settings that do not make an effect", () => {
    expect(() =>
      newEffectDocument({
        canvasWidth: 16,
        canvasHeight: 16,
        fixedPointBits: 8,
        fixedPointFraction: 8,
        rounding: "floor",
        halfTurn: "flip",
        edges: "wrap",
        columnGroup: 1,
      }),
    ).toThrow(/fixedPoint\.fraction/);
  });
});

describe("qNotation", () => {
  it("counts the sign among the integer bits (shear-core.md §3: bits 16 / fraction 8 is Q8.8, bits 8 / fraction 7 is Q1.7)", () => {
    expect(qNotation({ bits: 16, fraction: 8 })).toBe("Q8.8");
    expect(qNotation({ bits: 8, fraction: 7 })).toBe("Q1.7");
    expect(qNotation({ bits: 32, fraction: 16 })).toBe("Q16.16");
  });
});

describe("describeAngles", () => {
  it("says what a sweep or a list holds", () => {
    expect(describeAngles({ sweep: { from: -12, to: 12, frames: 48, easing: "ease-in-out", includeEnd: true } })).toBe(
      "sweep -12° → 12°, 48 frames, ease-in-out, end included",
    );
    expect(describeAngles({ list: [0, 90] })).toBe("list of 2 angles");
  });
});

describe("targetProfileInput", () => {
  it("gives field messages with the allowed range", () => {
    const result = targetProfileInput.safeParse({
      name: "",
      canvasWidth: 5000,
      canvasHeight: 10,
      fixedPointBits: 12,
      fixedPointFraction: 4,
      rounding: "bankers",
      halfTurn: "flip",
      edges: "wrap",
      columnGroup: 1,
    });
    expect(result.success).toBe(false);
    const messages = Object.fromEntries(result.error!.issues.map((i) => [i.path.join("."), i.message]));
    expect(messages.name).toMatch(/Give the target profile a name/);
    expect(messages.canvasWidth).toBe("Canvas width must be from 1 to 4096.");
    expect(messages.fixedPointBits).toBe("Bits must be one of 8, 16, 32.");
    expect(messages.rounding).toMatch(/Rounding must be one of nearest-away, nearest-up, floor, trunc/);
  });

  it("takes a colour limit from 2 to 256, blank or missing for none, and names the range otherwise", () => {
    const valid = { ...PROFILE_FORM, name: "Limited", canvasWidth: "160", canvasHeight: "144" };
    for (const [given, kept] of [
      ["4", 4],
      ["2", 2],
      ["256", 256],
      ["", null],
      [undefined, null],
    ] as const)
      expect(targetProfileInput.safeParse({ ...valid, maxColours: given }).data?.maxColours).toBe(kept);
    for (const wrong of ["1", "257", "3.5", "many", "-4"]) {
      const result = targetProfileInput.safeParse({ ...valid, maxColours: wrong });
      expect(result.error?.issues.map((i) => i.path.join("."))).toEqual(["maxColours"]);
      expect(result.error!.issues[0].message).toMatch(/2 to 256.*or empty for none/);
    }
  });

  it("reads a blank or missing whole number as none, not as 0 (where 0 would be allowed)", () => {
    const valid = {
      name: "Blank fraction",
      canvasWidth: "256",
      canvasHeight: "224",
      fixedPointBits: "16",
      fixedPointFraction: "0",
      rounding: "nearest-away",
      halfTurn: "flip",
      edges: "wrap",
      columnGroup: "1",
    };
    expect(targetProfileInput.safeParse(valid).data?.fixedPointFraction).toBe(0);
    for (const blank of ["", "   ", undefined]) {
      const result = targetProfileInput.safeParse({ ...valid, fixedPointFraction: blank });
      expect(result.success).toBe(false);
      expect(result.error!.issues.map((i) => [i.path.join("."), i.message])).toEqual([
        ["fixedPointFraction", "Fraction bits must be a whole number from 0 to 31."],
      ]);
    }
  });
});
