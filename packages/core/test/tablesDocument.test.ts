import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { TABLES_FORMAT, compileTables, parseEffect, tablesDocument, tablesText } from "../src/index.ts";
import { tablesDocumentText } from "../src/tablesDocument.ts";
import { smallEffect, turningAngle } from "./helpers/arbitraries.ts";

describe("tablesDocument: the skewsmith.tables/1 document of spec §8", () => {
  const effect = parseEffect({ canvas: { width: 2, height: 2 }, pivot: { x: 1, y: 1 }, angles: { list: [0, 90] } });
  const doc = tablesDocument(compileTables(effect));

  it("has the spec's keys in the spec's order, the effect with its defaults filled in, and the element type", () => {
    expect(TABLES_FORMAT).toBe("skewsmith.tables/1");
    expect(Object.keys(doc)).toEqual(["format", "effect", "elementType", "frames"]);
    expect(doc.format).toBe("skewsmith.tables/1");
    expect(doc.effect).toEqual(effect);
    expect(doc.elementType).toBe("int8");
    expect(Object.keys(doc.frames[0])).toEqual([
      "index",
      "degrees",
      "residualDegrees",
      "flip",
      "alpha",
      "beta",
      "h",
      "v",
      "maxErrorPx",
      "meanErrorPx",
      "wrapped",
      "clipped",
      "saturated",
      "maxAbsShift",
    ]);
  });

  it("the spec's own example frame: 0° on a 2 × 2 canvas is all zeros", () => {
    expect(doc.frames[0]).toEqual({
      index: 0,
      degrees: 0,
      residualDegrees: 0,
      flip: false,
      alpha: 0,
      beta: 0,
      h: [0, 0],
      v: [0, 0],
      maxErrorPx: 0,
      meanErrorPx: 0,
      wrapped: 0,
      clipped: 0,
      saturated: false,
      maxAbsShift: 0,
    });
  });

  it("90° on a 2 × 2 canvas about its centre corner (derived by hand from spec §3–§4)", () => {
    // kα = −256, kβ = 256; rows and columns sit at ∓1 half-pixel: h = R(±1/2) = [1, −1], v = R(∓1/2) = [−1, 1].
    expect(doc.frames[1]).toMatchObject({ degrees: 90, alpha: -256, beta: 256, h: [1, -1], v: [-1, 1], maxAbsShift: 1 });
  });

  it("is plain JSON: tables are arrays and it survives a JSON round trip unchanged", () => {
    expect(Array.isArray(doc.frames[1].h)).toBe(true);
    expect(JSON.parse(JSON.stringify(doc))).toEqual(doc);
  });
});

describe("tablesDocumentText writes the document's JSON straight from the typed arrays", () => {
  it("the same text as JSON.stringify of the document, compact and indented (arrays of numbers on one line), for any effect", () => {
    const collapse = (json: string) =>
      json.replace(/\[\s+(-?[\d.eE+-]+(?:,\s+-?[\d.eE+-]+)*)\s+\]/g, (_, body: string) => `[${body.split(/,\s+/).join(", ")}]`);
    fc.assert(
      fc.property(
        smallEffect({ maxSide: 9 }),
        fc.array(fc.oneof(turningAngle, fc.double({ min: -1e6, max: 1e6, noNaN: true })), { minLength: 1, maxLength: 9 }),
        (e0, angles) => {
          const e = { ...e0, angles: { list: [...angles, ...angles] } };
          let tables;
          try {
            tables = compileTables(e);
          } catch {
            fc.pre(false);
          }
          const doc = tablesDocument(tables!);
          expect(tablesDocumentText(tables!)).toBe(JSON.stringify(doc));
          expect(tablesDocumentText(tables!, true)).toBe(collapse(JSON.stringify(doc, null, 2)));
        },
      ),
      { numRuns: 150 },
    );
  });
});

describe("tablesText: what `skewsmith tables` prints", () => {
  const effect = parseEffect({ canvas: { width: 3, height: 2 }, pivot: { x: 1.5, y: 1 }, angles: { list: [0, 30] } });

  it("is one line of JSON and a newline, or two-space indented JSON when pretty, both the same document", () => {
    const line = tablesText(effect);
    const pretty = tablesText(effect, { pretty: true });
    expect(line.endsWith("}\n")).toBe(true);
    expect(line.slice(0, -1)).not.toContain("\n");
    expect(pretty).toMatch(/^\{\n {2}"format": "skewsmith\.tables\/1",\n/);
    expect(JSON.parse(pretty)).toEqual(JSON.parse(line));
    expect(JSON.parse(line)).toEqual(JSON.parse(JSON.stringify(tablesDocument(compileTables(effect)))));
  });
});
