/**
 * Diagnostics benchmark (issue 10, item 4): the per-pixel diagnostics of a 4096-frame full turn (0° → 360°, pivot at the
 * centre, Q8.8, nearest-away) on a 320×240 and a 1920×1080 canvas.
 *
 * Cases, all in this process, rounds interleaved, medians:
 *   baseline   the diagnostics before issue 10 (bench/baseline/frameDiagnostics.ts), one frame after another, one thread;
 *   one thread compileTables' diagnostics on the calling thread only (workers: 0): half the rows of each symmetric frame;
 *   threads    compileTables with its default worker pool (one worker per spare core, the calling thread measuring too).
 * The 1920×1080 baseline and one-thread cases run on every 16th frame (256 frames) and are scaled by 16; the threaded
 * case runs the whole track. "first call" is the threaded case's first round, which pays for starting the workers (from
 * source: each worker loads the TypeScript loader first). Also printed: whether the figures agree with the baseline (max
 * error, wrapped, clipped bit for bit; mean within 1e-9 px).
 * A benchmark prints numbers, never verdicts: nothing here passes or fails.
 *
 * Run: `npx tsx bench/diagnostics.bench.ts [rounds]` (default 5 rounds after 1 warm-up round).
 */
import os from "node:os";
import { compileShifts, compileTables } from "../src/compileTables.ts";
import { defaultWorkers } from "../src/diagnostics/nodePool.ts";
import { parseEffect, type Effect } from "../src/effect.ts";
import { frameDiagnostics as baselineDiagnostics } from "./baseline/frameDiagnostics.ts";
import { collectGarbage, median } from "./support.ts";

const FRAMES = 4096;
const ROUNDS = Number(process.argv[2] ?? 5);
const SAMPLE = 16;

const effectFor = (width: number, height: number): Effect =>
  parseEffect({
    canvas: { width, height },
    pivot: { x: width / 2, y: height / 2 },
    angles: { sweep: { from: 0, to: 360, frames: FRAMES } },
  });

interface Case {
  readonly name: string;
  readonly run: () => unknown;
  readonly scale: number;
  readonly times: number[];
}

function measure(cases: readonly Case[], rounds: number): void {
  for (let round = 0; round < rounds; round++)
    for (const c of cases) {
      collectGarbage();
      const start = performance.now();
      c.run();
      c.times.push((performance.now() - start) * c.scale);
    }
}

/** Whether compileTables' figures agree with the baseline's on every frame (every `step`-th frame). */
function agreement(effect: Effect, step: number): string {
  const tables = compileTables(effect);
  let worstMean = 0;
  let exact = true;
  for (let i = 0; i < tables.frames.length; i += step) {
    const f = tables.frames[i];
    const b = baselineDiagnostics(f, effect);
    if (f.maxErrorPx !== b.maxErrorPx || f.wrapped !== b.wrapped || f.clipped !== b.clipped) exact = false;
    worstMean = Math.max(worstMean, Math.abs(f.meanErrorPx - b.meanErrorPx));
  }
  return `${exact ? "max, wrapped, clipped equal" : "MAX/COUNTS DIFFER"}; mean within ${worstMean.toExponential(1)} px`;
}

const rows: string[][] = [];
const workers = defaultWorkers();
for (const [width, height] of [
  [320, 240],
  [1920, 1080],
] as const) {
  const effect = effectFor(width, height);
  const shifts = compileShifts(effect).frames;
  const step = width * height > 1e6 ? SAMPLE : 1;
  const sample = shifts.filter((_, i) => i % step === 0);
  const baseline: Case = {
    name: `${width}×${height} baseline (before issue 10), 1 thread`,
    run: () => sample.map((f) => baselineDiagnostics(f, effect)),
    scale: step,
    times: [],
  };
  const one: Case = {
    name: `${width}×${height} compileTables, workers: 0`,
    run: () =>
      step === 1
        ? compileTables(effect, { workers: 0 })
        : sample.map((f) => compileTables({ ...effect, angles: { list: [f.degrees] } }, { workers: 0 })),
    scale: step,
    times: [],
  };
  const pooled: Case = {
    name: `${width}×${height} compileTables, ${workers} worker(s) + caller`,
    run: () => compileTables(effect),
    scale: 1,
    times: [],
  };
  // The first threaded call starts the workers: timed on its own, before the rounds.
  const start = performance.now();
  pooled.run();
  const first = performance.now() - start;
  const cases = [baseline, one, pooled];
  measure(cases, step === 1 ? ROUNDS : Math.max(1, Math.ceil(ROUNDS / 2)));
  const baseMs = median(baseline.times);
  const checks = FRAMES * width * height;
  for (const c of cases) {
    const ms = median(c.times);
    rows.push([
      c.name,
      ms.toFixed(0),
      (Math.min(...c.times) | 0).toString(),
      (Math.max(...c.times) | 0).toString(),
      (baseMs / ms).toFixed(2),
      `${((ms * 1e6) / checks).toFixed(2)} ns per check${c.scale > 1 ? `, every ${c.scale}th frame ×${c.scale}` : ""}`,
    ]);
  }
  rows.push([
    `${width}×${height} first threaded call (workers starting)`,
    first.toFixed(0),
    "",
    "",
    (baseMs / first).toFixed(2),
    agreement(effect, step),
  ]);
}

const cpu = os.cpus();
console.log(
  `Diagnostics benchmark: ${FRAMES}-frame sweep 0° → 360°, pivot at the centre, Q8.8, nearest-away; medians of ${ROUNDS} interleaved rounds`,
);
console.log(
  `(1920×1080: ${Math.max(1, Math.ceil(ROUNDS / 2))} rounds). Node ${process.version}, ${cpu.length} × ${cpu[0]?.model ?? "unknown CPU"},`,
);
console.log(`load average ${os.loadavg()[0].toFixed(2)} at the end; min and max ms show the spread of the rounds.`);
console.log("÷ baseline: the baseline's median over this case's (above 1: faster). Targets (issue 10): 320×240 under 0.6 s, 1920×1080");
console.log("under 10 s on 2 cores.");
console.log("");
const header = ["case", "ms", "min", "max", "÷ baseline", "work"];
const widths = header.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i].length)));
const line = (r: readonly string[]) =>
  r.map((cell, i) => (i === 0 || i === 5 ? cell.padEnd(widths[i]) : cell.padStart(widths[i]))).join("  ");
console.log(line(header));
console.log(widths.map((w) => "-".repeat(w)).join("  "));
for (const r of rows) console.log(line(r).trimEnd());
