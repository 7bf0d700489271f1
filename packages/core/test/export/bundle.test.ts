import { describe, expect, it } from "vitest";
import { exportBundle } from "../../src/export/bundle.ts";
import { parseEffect } from "../../src/effect.ts";

const effect = parseEffect({ canvas: { width: 12, height: 10 }, pivot: { x: 6, y: 5 }, angles: { sweep: { from: 0, to: 90, frames: 4 } } });

describe("exportBundle progress", () => {
  it("reports the tables and every chosen output in order, ending at the total", () => {
    const steps: [number, number, string][] = [];
    const bundle = exportBundle(effect, { outputs: ["json", "c", "z80"] }, (done, total, step) => steps.push([done, total, step]));
    expect(steps).toEqual([
      [1, 4, "tables"],
      [2, 4, "c"],
      [3, 4, "z80"],
      [4, 4, "json"],
    ]);
    // Reporting changes nothing: the same files and zip as without a listener.
    const quiet = exportBundle(effect, { outputs: ["json", "c", "z80"] });
    expect(bundle.files.map((f) => f.name)).toEqual(quiet.files.map((f) => f.name));
    expect(bundle.zip).toEqual(quiet.zip);
  });
});
