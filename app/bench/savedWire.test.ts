import { parseEffect } from "@skewsmith/core";
import { describe, expect, it } from "vitest";
import { compassRose } from "../demo/art.ts";
import { prepareSource } from "./source.ts";
import { TrackDiagnosis } from "./trackDiagnosis.ts";
import type { SavedDiagnostics } from "./saved.server.ts";
import { packDiagnostics, unpackDiagnostics } from "./savedWire.ts";

const effect = parseEffect({
  canvas: { width: 20, height: 18 },
  pivot: { x: 10, y: 9 },
  angles: { sweep: { from: -30, to: 330, frames: 24 } },
});

function diagnosed(keys: [number, number][]): SavedDiagnostics {
  const source = prepareSource(effect, compassRose(16), null, null, keys);
  return { version: 3, rows: new TrackDiagnosis(effect, source).all(), content: 200, masked: true, tooLarge: false };
}

/** What the browser gets: the loader data after a trip through text (JSON stands in for the framework's encoding). */
const overTheWire = <T>(value: T): T => JSON.parse(JSON.stringify(value)) as T;

describe("the effect page's packed diagnostics", () => {
  it("give the browser the track diagnosis's rows, every field, with and without key pixels", () => {
    for (const keys of [
      [],
      [
        [5, 5],
        [6, 5],
        [12, 3],
      ],
    ] as [number, number][][]) {
      const saved = diagnosed(keys);
      const packed = packDiagnostics(saved);
      expect(typeof packed.rows).toBe("string");
      const back = unpackDiagnostics(overTheWire(packed));
      expect(back).toEqual(saved);
      expect(back.rows!.map((row) => Object.keys(row).sort())).toEqual(saved.rows!.map((row) => Object.keys(row).sort()));
    }
  });

  it("keep a track too large to measure as no rows", () => {
    const saved: SavedDiagnostics = { version: 1, rows: null, content: 0, masked: false, tooLarge: true };
    expect(unpackDiagnostics(overTheWire(packDiagnostics(saved)))).toEqual(saved);
  });

  it("are made once per answer, and the server renders from the rows it packed", () => {
    const saved = diagnosed([]);
    const packed = packDiagnostics(saved);
    expect(packDiagnostics(saved)).toBe(packed);
    expect(unpackDiagnostics(packed)).toBe(saved);
  });

  it("are smaller than the rows as objects", () => {
    const saved = diagnosed([]);
    expect(packDiagnostics(saved).rows!.length).toBeLessThan(JSON.stringify(saved.rows).length);
  });
});
