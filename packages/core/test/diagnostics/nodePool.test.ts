import { afterAll, describe, expect, it } from "vitest";
import { DiagnosticsPool, nodePool } from "../../src/diagnostics/nodePool.ts";
import { POOL_MIN_CHECKS } from "../../src/diagnostics/diagnoseTrack.ts";
import { diagnoseFrames, splitFrames, compileTables, parseEffect, type CompiledTables } from "../../src/index.ts";

// Just above the size at which compileTables spreads a track over worker threads.
const frames = Math.ceil(POOL_MIN_CHECKS / (320 * 240)) + 3;
const large = parseEffect({
  canvas: { width: 320, height: 240 },
  pivot: { x: 160, y: 120 },
  angles: { sweep: { from: 0, to: 360, frames } },
});

/** Every figure of every frame, as one list, to compare runs bit for bit. */
const figures = (t: CompiledTables) => t.frames.map((f) => [f.index, f.maxErrorPx, f.meanErrorPx, f.wrapped, f.clipped]);

describe("compileTables on worker threads (Node)", () => {
  const alone = compileTables(large, { workers: 0 });

  it("finds the worker module and starts workers from source", () => {
    expect(nodePool()).not.toBeNull();
  });

  it.each([1, 2])("gives the same figures with %i worker(s) as on the calling thread alone, bit for bit", (workers) => {
    expect(figures(compileTables(large, { workers }))).toEqual(figures(alone));
  });

  it("gives the same figures over a mask (sent to the workers in shared memory)", () => {
    const mask = Uint8Array.from({ length: 320 * 240 }, (_, i) => ((i * 2654435761) >>> 30) & 1);
    expect(figures(compileTables(large, { mask, workers: 2 }))).toEqual(figures(compileTables(large, { mask, workers: 0 })));
  });

  it("refuses a worker count that is not a whole number from 0 to 256", () => {
    expect(() => compileTables(large, { workers: -1 })).toThrow("workers: -1 is not allowed; allowed a whole number from 0 to 256");
    expect(() => compileTables(large, { workers: 1.5 })).toThrow("workers: 1.5 is not allowed");
  });
});

describe("DiagnosticsPool when workers fail", () => {
  const broken = new DiagnosticsPool({ entry: new URL("./no-such-worker.js", import.meta.url).href, loader: null });
  afterAll(() => broken.close());

  it("measures everything on the calling thread when its workers cannot load, and says nothing wrong", () => {
    const small = parseEffect({
      canvas: { width: 64, height: 48 },
      pivot: { x: 32, y: 24 },
      angles: { sweep: { from: 0, to: 360, frames: 40 } },
    });
    const ranges = splitFrames(40, 12);
    let local = 0;
    const results = broken.run(small, undefined, ranges, 2, (range) => {
      local++;
      return diagnoseFrames(small, range);
    });
    expect(local).toBe(12);
    expect(results.map((r) => [r.start, r.end])).toEqual(ranges.map((r) => [r.start, r.end]));
    expect(results.flatMap((r) => Array.from(r.maxErrorPx))).toEqual(Array.from(diagnoseFrames(small).maxErrorPx));
  });
});

describe("DiagnosticsPool with working workers", () => {
  it("hands ranges to the workers once they are ready, and their answers are the calling thread's figures", () => {
    const pool = nodePool()!;
    const small = parseEffect({
      canvas: { width: 96, height: 64 },
      pivot: { x: 48, y: 32 },
      angles: { sweep: { from: 0, to: 360, frames: 64 } },
    });
    const ranges = splitFrames(64, 32);
    const slowLocal = (range: { start: number; end: number }) => {
      // The calling thread takes its time, so the workers (started by the tests above, or now) get their share.
      const until = performance.now() + 40;
      while (performance.now() < until);
      local++;
      return diagnoseFrames(small, range);
    };
    let local = 0;
    pool.run(small, undefined, ranges, 1, slowLocal); // warms the worker up if the tests above did not
    local = 0;
    const results = pool.run(small, undefined, ranges, 1, slowLocal);
    expect(local).toBeLessThan(ranges.length);
    const all = diagnoseFrames(small);
    expect(results.flatMap((r) => Array.from(r.meanErrorPx))).toEqual(Array.from(all.meanErrorPx));
  });
});

describe("DiagnosticsPool.begin", () => {
  it("lets the workers measure while the caller does other work, and finish gives the calling thread's figures", () => {
    const pool = nodePool()!;
    const small = parseEffect({
      canvas: { width: 96, height: 64 },
      pivot: { x: 48, y: 32 },
      angles: { sweep: { from: 0, to: 360, frames: 64 } },
    });
    const ranges = splitFrames(64, 16);
    pool.run(small, undefined, ranges, 1, (range) => diagnoseFrames(small, range)); // the worker is loaded after this
    const pending = pool.begin(small, undefined, ranges, 1);
    const until = performance.now() + 300; // the caller busy elsewhere
    while (performance.now() < until);
    let local = 0;
    const all = pending.finish((range) => (local++, diagnoseFrames(small, range)));
    expect(local).toBeLessThan(ranges.length);
    expect(Array.from(all.meanErrorPx)).toEqual(Array.from(diagnoseFrames(small).meanErrorPx));
  });
});
