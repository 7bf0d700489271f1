/**
 * Tables benchmark (issue 2, part 8): a 4096-frame track (a full turn, 0° to 360°, pivot at the centre) compiled on a
 * 320×240 and on a 1920×1080 canvas, tables alone (compileShifts) and with full per-pixel diagnostics (compileTables).
 *
 * Ratios are against floors measured in this same run:
 *   tables: a plain JS loop writing the same number of int32 entries into one preallocated buffer;
 *   diagnostics: a plain JS loop doing, per pixel check, the float work the mean error cannot do without
 *   (two additions for the ideal position, one distance with its square root, one addition to the sum).
 * A benchmark prints numbers, never verdicts: nothing here passes or fails.
 *
 * Run: `npx tsx bench/tables.bench.ts [rounds]` (default 7 rounds after 2 warm-up rounds; the 1920×1080 diagnostics run once).
 */
import os from "node:os";
import { compileShifts, compileTables } from "../src/compileTables.ts";
import { parseEffect, type Effect } from "../src/effect.ts";
import { frameDiagnostics as baselineDiagnostics } from "./baseline/frameDiagnostics.ts";
import { collectGarbage, median } from "./support.ts";

const FRAMES = 4096;
const ROUNDS = Number(process.argv[2] ?? 7);
const WARM_UP = 2;

const effectFor = (width: number, height: number): Effect =>
  parseEffect({
    canvas: { width, height },
    pivot: { x: width / 2, y: height / 2 },
    angles: { sweep: { from: 0, to: 360, frames: FRAMES } },
  });

/** Runs every case once per round, rounds interleaved; returns each case's median in ms. */
function measure(cases: readonly (() => unknown)[], rounds: number, warmUp: number): number[] {
  const times = cases.map(() => [] as number[]);
  for (let round = 0; round < warmUp + rounds; round++)
    cases.forEach((run, i) => {
      collectGarbage();
      const start = performance.now();
      run();
      const ms = performance.now() - start;
      if (round >= warmUp) times[i].push(ms);
    });
  return times.map(median);
}

let sink = 0;

/** Floor for the tables: write `entries` int32 values into a buffer allocated once. */
function entriesFloor(buffer: Int32Array): void {
  for (let i = 0; i < buffer.length; i++) buffer[i] = (i & 7) - 4;
  sink += buffer[buffer.length - 1];
}

/** Floor for the diagnostics: per check, advance an ideal position and add one distance to a running sum. */
function checksFloor(frames: number, width: number, height: number): void {
  let sum = 0;
  let max2 = 0;
  for (let f = 0; f < frames; f++) {
    const step = 1 + f / frames;
    for (let r = 0; r < height; r++) {
      let x = -r * 0.25;
      let y = r * 0.5;
      for (let c = 0; c < width; c++, x += step, y += 0.125) {
        const ex = c - x;
        const ey = r - y;
        const e2 = ex * ex + ey * ey;
        sum += Math.sqrt(e2);
        if (e2 > max2) max2 = e2;
      }
    }
  }
  sink += sum + max2;
}

const rows: string[][] = [];
const small = effectFor(320, 240);
const large = effectFor(1920, 1080);
const smallEntries = new Int32Array(FRAMES * (320 + 240));
const largeEntries = new Int32Array(FRAMES * (1920 + 1080));

// Tables alone, and the floors that are cheap enough to repeat, interleaved.
const [floorSmall, shiftsSmall, floorLarge, shiftsLarge] = measure(
  [() => entriesFloor(smallEntries), () => compileShifts(small), () => entriesFloor(largeEntries), () => compileShifts(large)],
  ROUNDS,
  WARM_UP,
);
rows.push(
  ["320×240 tables floor (int32 writes)", floorSmall.toFixed(1), "1.00", `${smallEntries.length} entries`],
  [
    "320×240 tables (compileShifts)",
    shiftsSmall.toFixed(1),
    (shiftsSmall / floorSmall).toFixed(2),
    `${((shiftsSmall * 1e6) / smallEntries.length).toFixed(1)} ns per table entry delivered`,
  ],
  ["1920×1080 tables floor (int32 writes)", floorLarge.toFixed(1), "1.00", `${largeEntries.length} entries`],
  [
    "1920×1080 tables (compileShifts)",
    shiftsLarge.toFixed(1),
    (shiftsLarge / floorLarge).toFixed(2),
    `${((shiftsLarge * 1e6) / largeEntries.length).toFixed(1)} ns per table entry delivered`,
  ],
);

// Tables with diagnostics on 320×240: 315 million pixel checks per run.
const smallChecks = FRAMES * 320 * 240;
const diagRounds = Math.max(1, Math.ceil(ROUNDS / 2));
/** compileTables as it was before issue 10: the shifts, then the baseline diagnostics frame by frame on one thread. */
const baselineTables = (effect: Effect) => {
  const shifts = compileShifts(effect);
  return shifts.frames.map((f) => ({ ...f, ...baselineDiagnostics(f, effect) }));
};
const [checksSmall, tablesSmall, baselineSmall] = measure(
  [() => checksFloor(FRAMES, 320, 240), () => compileTables(small), () => baselineTables(small)],
  diagRounds,
  1,
);
rows.push(
  ["320×240 diagnostics floor (float work)", checksSmall.toFixed(0), "1.00", `${smallChecks} checks`],
  [
    "320×240 tables + diagnostics before issue 10",
    baselineSmall.toFixed(0),
    (baselineSmall / checksSmall).toFixed(2),
    `${((baselineSmall * 1e6) / smallChecks).toFixed(2)} ns per check; compileTables now ${(baselineSmall / tablesSmall).toFixed(2)}× faster`,
  ],
  [
    "320×240 tables + diagnostics (compileTables)",
    tablesSmall.toFixed(0),
    (tablesSmall / checksSmall).toFixed(2),
    `${((tablesSmall * 1e6) / smallChecks).toFixed(2)} ns per check`,
  ],
);

// Tables with diagnostics on 1920×1080: 8.5 billion pixel checks, so one run; its floor is the 320×240 one per check.
const largeChecks = FRAMES * 1920 * 1080;
const [tablesLarge] = measure([() => compileTables(large)], 1, 0);
const checksLarge = (checksSmall * largeChecks) / smallChecks;
rows.push(
  ["1920×1080 diagnostics floor (scaled)", checksLarge.toFixed(0), "1.00", `${largeChecks} checks at the 320×240 floor's time per check`],
  [
    "1920×1080 tables + diagnostics (compileTables)",
    tablesLarge.toFixed(0),
    (tablesLarge / checksLarge).toFixed(2),
    `${((tablesLarge * 1e6) / largeChecks).toFixed(2)} ns per check, 1 run`,
  ],
);

const cpu = os.cpus();
console.log(
  `Tables benchmark: ${FRAMES}-frame sweep 0° → 360°, pivot at the centre, default fixed point (Q8.8), medians of ${ROUNDS} interleaved rounds`,
);
console.log(
  `(diagnostics on 320×240: ${diagRounds} rounds; on 1920×1080: one run). Node ${process.version}, ${cpu.length} × ${cpu[0]?.model ?? "unknown CPU"},`,
);
console.log(
  `load average ${os.loadavg()[0].toFixed(2)} at the end. ÷ floor: the case's time over the floor just above it, measured in this run.`,
);
console.log(
  "Issue targets, for reference: tables alone on 320×240 under 50 ms; with diagnostics under 1.5 s (issue 2), under 0.6 s (issue 10;",
);
console.log("bench/diagnostics.bench.ts has the threaded figures). compileTables spreads the diagnostics over its worker pool here.");
console.log("");
const header = ["case", "ms", "÷ floor", "work"];
const widths = header.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i].length)));
const line = (r: readonly string[]) =>
  r.map((cell, i) => (i === 0 || i === 3 ? cell.padEnd(widths[i]) : cell.padStart(widths[i]))).join("  ");
console.log(line(header));
console.log(widths.map((w) => "-".repeat(w)).join("  "));
for (const r of rows) console.log(line(r).trimEnd());
if (sink === 0.5) console.log(""); // keeps the floors' results alive
