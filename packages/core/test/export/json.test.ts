import { describe, expect, it } from "vitest";
import { compileTables, parseEffect, tablesJson, tablesText } from "../../src/index.ts";
import { tablesDocumentPieces } from "../../src/export/json.ts";
import { tableListTexts, tablesDocumentText } from "../../src/tablesDocument.ts";

const effects = [
  parseEffect({ canvas: { width: 6, height: 4 }, pivot: { x: 3, y: 2 }, angles: { list: [17] } }),
  parseEffect({
    canvas: { width: 9, height: 7 },
    pivot: { x: 2, y: 5.5 },
    angles: { sweep: { from: -200, to: 200, frames: 7 } },
    edges: "clip",
  }),
];

describe("tablesDocumentPieces", () => {
  it.each([1, 3, 256])("join into exactly tablesDocumentText, indented or not, at %i frames a piece", (per) => {
    for (const effect of effects) {
      const tables = compileTables(effect);
      expect(tablesDocumentPieces(tables, false, per).join("")).toBe(tablesDocumentText(tables));
      expect(tablesDocumentPieces(tables, true, per).join("")).toBe(tablesDocumentText(tables, true));
      expect(`${tablesDocumentPieces(tables, true, per).join("")}\n`).toBe(tablesJson(tables));
      expect(`${tablesDocumentPieces(tables, false, per).join("")}\n`).toBe(tablesText(effect));
    }
  });

  it("join into the same text with the tables printed ahead (tableListTexts), and refuse tables printed the other way", () => {
    for (const effect of effects) {
      const tables = compileTables(effect);
      for (const indent of [false, true]) {
        const lists = tableListTexts(tables.frames, indent);
        expect(lists.texts.size).toBeGreaterThan(0);
        expect(tablesDocumentPieces(tables, indent, 3, lists).join("")).toBe(tablesDocumentText(tables, indent));
        expect(() => tablesDocumentPieces(tables, !indent, 3, lists)).toThrow(
          `lists: printed with indent ${indent}; allowed only lists printed with indent ${!indent}`,
        );
      }
    }
  });

  it("holds a piece per few frames, not one per document", () => {
    const tables = compileTables(effects[1]);
    // head, 3 frame pieces with 2 commas between, tail
    expect(tablesDocumentPieces(tables, false, 3)).toHaveLength(7);
  });

  it("names the parameter and the allowed range for a bad piece size", () => {
    const tables = compileTables(effects[0]);
    expect(() => tablesDocumentPieces(tables, false, 0)).toThrow("framesPerPiece: 0 is not allowed; allowed a whole number from 1");
  });
});
