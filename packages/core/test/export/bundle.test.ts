import { describe, expect, it } from "vitest";
import { exportBundle, exportBundleZipping } from "../../src/export/bundle.ts";
import { POOL_MIN_CHECKS } from "../../src/diagnostics/diagnoseTrack.ts";
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

describe("exportBundleZipping (the command line's export with --zip)", () => {
  // A track large enough that its diagnostics go to worker threads, and a small one measured on this thread.
  const long = parseEffect({
    canvas: { width: 160, height: 120 },
    pivot: { x: 80, y: 60 },
    angles: { sweep: { from: -30, to: 330, frames: 4096 } },
  });
  it.each([
    ["a small track", effect, {}],
    ["a long track, measured on worker threads", long, {}],
    ["dedupe, half, scroll, 10-bit registers", long, { dedupe: true, half: true, sign: "scroll", registerBits: 10 }],
    ["a few outputs, json first", effect, { outputs: ["json", "bin", "68k"] }],
  ] as const)("gives the same files and the same zip bytes as exportBundle: %s", async (_name, e, options) => {
    if (e === long) expect(160 * 120 * 4096).toBeGreaterThanOrEqual(POOL_MIN_CHECKS);
    const steps: string[] = [];
    const zipping = await exportBundleZipping(e, options, (_done, _total, step) => steps.push(step));
    const plain = exportBundle(e, options);
    expect(steps).toEqual(["tables", ...plain.options.outputs]);
    expect(zipping.files.map((f) => f.name)).toEqual(plain.files.map((f) => f.name));
    for (const [i, f] of zipping.files.entries()) expect(Buffer.from(f.bytes).equals(Buffer.from(plain.files[i].bytes))).toBe(true);
    expect(Buffer.from(await zipping.zipAsync()).equals(Buffer.from(plain.zip))).toBe(true);
  });

  it("rejects a bad option as exportBundle throws it, and an oversized track", async () => {
    await expect(exportBundleZipping(effect, { registerBits: 99 })).rejects.toThrow(/registerBits/);
    expect(() => exportBundle(effect, { registerBits: 99 })).toThrow(/registerBits/);
  });
});
