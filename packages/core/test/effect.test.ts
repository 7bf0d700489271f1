import { describe, expect, it } from "vitest";
import { EFFECT_DEFAULTS, EFFECT_FORMAT, EffectError, checkEffect, parseEffect } from "../src/index.ts";

const minimal = () => ({
  canvas: { width: 64, height: 48 },
  pivot: { x: 32, y: 24 },
  angles: { sweep: { from: 0, to: 360, frames: 64 } },
});

/** The minimal document with one field replaced (dotted path; `undefined` removes it). */
function withField(path: string, value: unknown): Record<string, unknown> {
  const doc: Record<string, unknown> = JSON.parse(JSON.stringify(minimal()));
  const keys = path.split(".");
  let at = doc;
  for (const k of keys.slice(0, -1)) {
    if (typeof at[k] !== "object" || at[k] === null) at[k] = {};
    at = at[k] as Record<string, unknown>;
  }
  const last = keys[keys.length - 1];
  if (value === undefined) delete at[last];
  else at[last] = value;
  return doc;
}

describe("parseEffect fills in the defaults of spec §7", () => {
  it("only canvas, pivot and angles are required; the rest take the documented defaults", () => {
    const effect = parseEffect(minimal());
    expect(effect).toEqual({
      format: "skewsmith.effect/1",
      canvas: { width: 64, height: 48 },
      pivot: { x: 32, y: 24 },
      angles: { sweep: { from: 0, to: 360, frames: 64, easing: "linear", includeEnd: false } },
      fixedPoint: { bits: 16, fraction: 8 },
      rounding: "nearest-away",
      halfTurn: "flip",
      edges: "wrap",
      columnGroup: 1,
    });
    expect(EFFECT_FORMAT).toBe("skewsmith.effect/1");
    expect(EFFECT_DEFAULTS).toMatchObject({ rounding: "nearest-away", halfTurn: "flip", edges: "wrap", columnGroup: 1 });
  });

  it("a partial fixedPoint keeps the other default", () => {
    expect(parseEffect(withField("fixedPoint", { fraction: 12 })).fixedPoint).toEqual({ bits: 16, fraction: 12 });
    expect(parseEffect(withField("fixedPoint", { bits: 32 })).fixedPoint).toEqual({ bits: 32, fraction: 8 });
  });

  it("accepts every edge of the allowed ranges (spec §1, §7)", () => {
    const doc = {
      format: "skewsmith.effect/1",
      canvas: { width: 4096, height: 1 },
      pivot: { x: 4096, y: 0.5 },
      angles: { list: [-1e6, 0, 1e6] },
      fixedPoint: { bits: 8, fraction: 7 },
      rounding: "trunc",
      halfTurn: "shear",
      edges: "clip",
      columnGroup: 4096,
    };
    expect(parseEffect(doc)).toEqual(doc);
    expect(parseEffect(withField("pivot", { x: 0, y: 0 })).pivot).toEqual({ x: 0, y: 0 });
    expect(parseEffect(withField("fixedPoint", { bits: 32, fraction: 0 })).fixedPoint).toEqual({ bits: 32, fraction: 0 });
    expect(parseEffect(withField("angles", { list: new Array(4096).fill(1) })).angles).toEqual({ list: new Array(4096).fill(1) });
  });

  it("does not change its input", () => {
    const doc = minimal();
    const copy = JSON.parse(JSON.stringify(doc));
    parseEffect(doc);
    expect(doc).toEqual(copy);
  });
});

describe("every bad field is rejected with a message naming the field, the value and the allowed range (spec §7)", () => {
  // [field path, bad value, text the message must contain: the value and the allowed range]
  const cases: [string, unknown, string[]][] = [
    ["canvas.width", 0, ["0", "1 to 4096"]],
    ["canvas.width", 4097, ["4097", "1 to 4096"]],
    ["canvas.height", 2.5, ["2.5", "whole number", "1 to 4096"]],
    ["canvas.height", "48", ['"48"', "1 to 4096"]],
    ["pivot.x", 3.25, ["3.25", "multiple of 0.5", "0 to 64"]],
    ["pivot.x", -0.5, ["-0.5", "0 to 64"]],
    ["pivot.y", 48.5, ["48.5", "0 to 48"]],
    ["angles.sweep.frames", 0, ["0", "1 to 4096"]],
    ["angles.sweep.frames", 4097, ["4097", "1 to 4096"]],
    ["angles.sweep.frames", 1.5, ["1.5", "1 to 4096"]],
    ["angles.sweep.from", "zero", ['"zero"', "finite number"]],
    ["angles.sweep.easing", "cubic", ['"cubic"', '"linear"', '"ease-in-out"']],
    ["angles.sweep.includeEnd", "yes", ['"yes"', "true or false"]],
    ["fixedPoint.bits", 12, ["12", "8, 16, 32"]],
    ["fixedPoint.fraction", 16, ["16", "0 to 15"]],
    ["fixedPoint.fraction", -1, ["-1"]],
    ["rounding", "round", ['"round"', '"nearest-away"', '"nearest-up"', '"floor"', '"trunc"']],
    ["halfTurn", "mirror", ['"mirror"', '"flip"', '"shear"']],
    ["edges", "repeat", ['"repeat"', '"wrap"', '"clip"']],
    ["columnGroup", 0, ["0", "1 to"]],
    ["columnGroup", 65, ["65", "1 to 64"]],
    ["columnGroup", 2.5, ["2.5"]],
    ["format", "skewsmith.effect/2", ['"skewsmith.effect/2"', '"skewsmith.effect/1"']],
  ];

  it.each(cases)("%s = %j", (path, value, mentions) => {
    const result = checkEffect(withField(path, value));
    expect(result.ok).toBe(false);
    if (result.ok) return;
    const issue = result.issues.find((i) => i.path === path);
    expect(issue, `an issue for ${path} among ${JSON.stringify(result.issues)}`).toBeDefined();
    for (const m of mentions) expect(issue!.message).toContain(m);
  });

  it("a missing required field is named as required, with what is allowed", () => {
    for (const field of ["canvas", "pivot", "angles", "canvas.width", "pivot.y", "angles.sweep.to"]) {
      const result = checkEffect(withField(field, undefined));
      expect(result.ok).toBe(false);
      if (!result.ok) expect(result.issues.find((i) => i.path === field)?.message).toMatch(/^required; allowed /);
    }
  });

  it("an empty list and a list of more than 4096 angles are rejected with the count allowed", () => {
    const empty = checkEffect(withField("angles", { list: [] }));
    expect(!empty.ok && empty.issues[0]).toMatchObject({ path: "angles.list" });
    expect(!empty.ok && empty.issues[0].message).toContain("1 to 4096");
    const long = checkEffect(withField("angles", { list: new Array(4097).fill(0) }));
    expect(!long.ok && long.issues[0]).toMatchObject({ path: "angles.list" });
    expect(!long.ok && long.issues[0].message).toContain("4097");
  });

  it("a list entry that is not a finite number is named by its index", () => {
    const result = checkEffect(withField("angles", { list: [0, "ten", null, Number.POSITIVE_INFINITY] }));
    expect(result.ok).toBe(false);
    if (result.ok) return;
    expect(result.issues.map((i) => i.path)).toEqual(["angles.list[1]", "angles.list[2]", "angles.list[3]"]);
    expect(result.issues[0].message).toContain('"ten"');
  });

  it("angles must be exactly one of list or sweep", () => {
    for (const angles of [{ list: [1], sweep: { from: 0, to: 1, frames: 1 } }, {}, [1, 2], { spin: 3 }]) {
      const result = checkEffect(withField("angles", angles));
      expect(result.ok).toBe(false);
      if (!result.ok) expect(result.issues.some((i) => i.path.startsWith("angles"))).toBe(true);
    }
  });

  it("unknown fields are rejected by name, at any level", () => {
    const top = checkEffect({ ...minimal(), colour: 3 });
    expect(!top.ok && top.issues[0].message).toContain('"colour"');
    const inner = checkEffect(withField("canvas.depth", 2));
    expect(!inner.ok && inner.issues[0]).toMatchObject({ path: "canvas" });
    expect(!inner.ok && inner.issues[0].message).toContain('"depth"');
  });

  it("a document that is not an object is rejected", () => {
    for (const doc of [null, 3, "effect", [minimal()]]) expect(checkEffect(doc).ok).toBe(false);
  });

  it("a list nested too deep to write out is rejected with a message, not a thrown RangeError", () => {
    let deep: unknown[] = [];
    for (let i = 0; i < 100_000; i++) deep = [deep];
    for (const doc of [deep, withField("canvas", deep)]) {
      const result = checkEffect(doc);
      expect(result.ok).toBe(false);
      expect(!result.ok && result.issues[0].message).toContain("a list nested too deep to show");
    }
  });

  it("reports every bad field at once, cross-field checks included", () => {
    const doc = {
      canvas: { width: 8, height: 0 },
      pivot: { x: 9, y: 0.3 },
      angles: { list: [] },
      fixedPoint: { bits: 8, fraction: 8 },
      rounding: "up",
      columnGroup: 9,
    };
    const result = checkEffect(doc);
    expect(result.ok).toBe(false);
    if (result.ok) return;
    const paths = result.issues.map((i) => i.path).sort();
    expect(paths).toEqual(["angles.list", "canvas.height", "columnGroup", "fixedPoint.fraction", "pivot.x", "pivot.y", "rounding"]);
  });

  it("nothing is computed from a half-valid document: parseEffect throws EffectError listing the issues", () => {
    const doc = withField("rounding", "sideways");
    let error: unknown;
    try {
      parseEffect(doc);
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(EffectError);
    const e = error as EffectError;
    expect(e.issues).toEqual([{ path: "rounding", message: expect.stringContaining('"sideways"') }]);
    expect(e.message).toContain("rounding:");
  });
});
