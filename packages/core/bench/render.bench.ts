/**
 * Render benchmark (issue 2, part 8; issue 10, item 6): one 3840×2160 RGBA frame turned by 7°, 30° and 80° about its
 * centre.
 *
 * Every case runs once per round, all rounds interleaved in one process so that every case sees the same machine load,
 * after warm-up rounds for all of them (the library included); the table shows the median of each. Ratios are against
 * cases measured in this same run:
 *   (a) the memory floor: a plain block copy of the frame, three times (TypedArray.prototype.set);
 *   (b) a naive per-pixel inverse mapping in JS: every destination pixel turns its centre back and copies the nearest
 *       source pixel, or background when that falls outside;
 *   (c) a general-purpose image library from the registry (sharp, libvips on one thread), nearest-neighbour affine,
 *       its output cropped (or padded) to the same 3840×2160 about the centre (a second sharp pipeline, timed with the first:
 *       sharp cannot crop after an affine in one pipeline);
 *   (d) the renderer before issue 10 (bench/baseline/render.ts).
 * "pixels kept" counts distinct source pixels present in the output: every source pixel carries its own value.
 * A benchmark prints numbers, never verdicts: nothing here passes or fails.
 *
 * Run: `npx tsx bench/render.bench.ts [rounds]` (default 11 rounds after 2 warm-up rounds).
 */
import os from "node:os";
import type { Sharp } from "sharp";
import type sharpLibrary from "sharp";
import { compileFrame } from "../src/compileTables.ts";
import { parseEffect, type Effect } from "../src/effect.ts";
import { Renderer } from "../src/render.ts";
import { Renderer as BaselineRenderer } from "./baseline/render.ts";
import { collectGarbage, median } from "./support.ts";

const W = 3840;
const H = 2160;
const N = W * H;
const ANGLES = [7, 30, 80];
const ROUNDS = Number(process.argv[2] ?? 11);
const WARM_UP = 2;

// Every source pixel gets its own opaque colour: id + 1 in R, G, B (little-endian words), alpha 255; 0 is background.
const ID_MASK = 0xffffff;
const source = new Uint32Array(N);
for (let i = 0; i < N; i++) source[i] = ((i + 1) | 0xff000000) >>> 0;
const sourceBytes = Buffer.from(source.buffer, source.byteOffset, source.byteLength);

// All planes are allocated, and touched, once: first touches of fresh memory cost more than the work measured here.
const planeA = new Uint32Array(N).fill(1);
const planeB = new Uint32Array(N).fill(1);
const naiveOut = new Uint32Array(N).fill(1);
const renderer = new Renderer(W, H, Uint32Array);
const baselineRenderer = new BaselineRenderer(W, H, Uint32Array);
const seen = new Uint8Array(N + 1);

/** How many distinct source pixels a plane of words (RGBA, little-endian) holds. */
function kept(words: Uint32Array): number {
  seen.fill(0);
  let n = 0;
  for (let i = 0; i < words.length; i++) {
    const w = words[i];
    if (w >>> 24 === 0) continue; // background
    const id = w & ID_MASK;
    if (id === 0 || id > N || seen[id] === 1) continue;
    seen[id] = 1;
    n++;
  }
  return n;
}

/** (b): for every destination pixel, the source pixel under its centre turned back by θ about the centre of the frame. */
function naiveInverse(src: Uint32Array, dst: Uint32Array, degrees: number): void {
  const t = (degrees * Math.PI) / 180;
  const cos = Math.cos(t);
  const sin = Math.sin(t);
  const px = W / 2;
  const py = H / 2;
  for (let r = 0; r < H; r++) {
    for (let c = 0; c < W; c++) {
      const x = c + 0.5 - px;
      const y = r + 0.5 - py;
      const sc = Math.floor(x * cos + y * sin + px);
      const sr = Math.floor(-x * sin + y * cos + py);
      dst[r * W + c] = sc >= 0 && sc < W && sr >= 0 && sr < H ? src[sr * W + sc] : 0;
    }
  }
}

/** The library, loaded before any case runs: every case is measured with its native code in the process. */
const sharp: typeof sharpLibrary = (await import("sharp")).default;
sharp.concurrency(1);
sharp.cache(false);

/** (c): raw RGBA in, nearest-neighbour affine turn by θ, then the centred W×H of its output, raw RGBA out. */
async function library(degrees: number): Promise<{ data: Buffer; width: number; height: number }> {
  const t = (degrees * Math.PI) / 180;
  const cos = Math.cos(t);
  const sin = Math.sin(t);
  const pipeline: Sharp = sharp(sourceBytes, { raw: { width: W, height: H, channels: 4 } }).affine(
    [
      [cos, -sin],
      [sin, cos],
    ],
    { interpolator: sharp.interpolators.nearest, background: { r: 0, g: 0, b: 0, alpha: 0 } },
  );
  const turned = await pipeline.raw().toBuffer({ resolveWithObject: true });
  // The centred W×H of the turned bounding box: cropped where the box is larger, padded (transparent) where smaller.
  const bw = turned.info.width;
  const bh = turned.info.height;
  const cw = Math.min(W, bw);
  const ch = Math.min(H, bh);
  const { data, info } = await sharp(turned.data, { raw: { width: bw, height: bh, channels: 4 } })
    .extract({ left: (bw - cw) >> 1, top: (bh - ch) >> 1, width: cw, height: ch })
    .extend({
      left: (W - cw) >> 1,
      right: W - cw - ((W - cw) >> 1),
      top: (H - ch) >> 1,
      bottom: H - ch - ((H - ch) >> 1),
      background: { r: 0, g: 0, b: 0, alpha: 0 },
    })
    .raw()
    .toBuffer({ resolveWithObject: true });
  return { data, width: info.width, height: info.height };
}

/** How many source pixels have their centre turned by θ about the frame's centre still on the frame. */
function landing(degrees: number): number {
  const t = (degrees * Math.PI) / 180;
  const cos = Math.cos(t);
  const sin = Math.sin(t);
  let n = 0;
  for (let r = 0; r < H; r++) {
    for (let c = 0; c < W; c++) {
      const x = c + 0.5 - W / 2;
      const y = r + 0.5 - H / 2;
      const tx = x * cos - y * sin + W / 2;
      const ty = x * sin + y * cos + H / 2;
      if (tx >= 0 && tx < W && ty >= 0 && ty < H) n++;
    }
  }
  return n;
}

function words(bytes: Buffer): Uint32Array {
  const aligned = bytes.byteOffset % 4 === 0 ? bytes : Buffer.from(bytes);
  return new Uint32Array(aligned.buffer, aligned.byteOffset, aligned.byteLength / 4);
}

interface Case {
  name: string;
  readonly run: () => unknown;
  readonly times: number[];
  kept?: string;
}

const effectAt = (degrees: number): Effect =>
  parseEffect({ canvas: { width: W, height: H }, pivot: { x: W / 2, y: H / 2 }, angles: { list: [degrees] } });

const floor: Case = {
  name: "(a) floor: 3 block copies",
  run: () => {
    planeA.set(source);
    planeB.set(planeA);
    planeA.set(planeB);
  },
  times: [],
};
const cases: Case[] = [floor];
const groups: { degrees: number; passes: Case[]; whole: Case; naive: Case; lib: Case; baseline: Case }[] = [];
for (const degrees of ANGLES) {
  const effect = effectAt(degrees);
  const frame = compileFrame(effect, 0, degrees);
  const passes: Case[] = [
    { name: `${degrees}° pass 1 (rows)`, run: () => renderer.render(source, frame, effect, 1), times: [] },
    { name: `${degrees}° passes 1+2`, run: () => renderer.render(source, frame, effect, 2), times: [] },
    { name: `${degrees}° pass 3 (rows)`, run: () => renderer.secondRowPass(planeB, planeA, frame, effect), times: [] },
  ];
  const whole: Case = { name: `${degrees}° three-shear render`, run: () => renderer.render(source, frame, effect), times: [] };
  const naive: Case = { name: `${degrees}° (b) naive inverse, JS`, run: () => naiveInverse(source, naiveOut, degrees), times: [] };
  const lib: Case = { name: `${degrees}° (c) sharp affine, cropped to ${W}×${H}`, run: () => library(degrees), times: [] };
  const baseline: Case = {
    name: `${degrees}° (d) renderer before issue 10`,
    run: () => baselineRenderer.render(source, frame, effect),
    times: [],
  };
  cases.push(...passes, whole, naive, lib, baseline);
  groups.push({ degrees, passes, whole, naive, lib, baseline });
  // Pixels kept, counted once outside the timing.
  whole.kept = share(kept(renderer.render(source, frame, effect)));
  naiveInverse(source, naiveOut, degrees);
  const naiveKept = kept(naiveOut);
  const land = landing(degrees);
  naive.kept = `${share(naiveKept)}; ${((100 * naiveKept) / land).toFixed(2)}% of the ${land} landing on the frame`;
}

// Every angle (issue 10, item 6: the floor ratio holds at every angle, not only the three above): the render alone at
// each of these, interleaved with the rest: every 4° from 1° to 89°, the same turned the other way, the quarter turn and
// past it, where a frame is the half-turn flip and a shear by θ − 180°.
const QUADRANT = Array.from({ length: 23 }, (_, i) => 1 + 4 * i);
const SWEEP = [0.5, ...QUADRANT, ...QUADRANT.map((a) => -a), 90, 91, 100, 120, 135, 150, 170, 179.5, -135];
const sweep: { degrees: number; render: Case }[] = [];
for (const degrees of SWEEP) {
  const effect = effectAt(degrees);
  const frame = compileFrame(effect, 0, degrees);
  const render: Case = { name: `${degrees}°`, run: () => renderer.render(source, frame, effect), times: [] };
  cases.push(render);
  sweep.push({ degrees, render });
}

function share(n: number): string {
  return `${n} (${((100 * n) / N).toFixed(2)}%)`;
}

async function measure(phase: readonly Case[]): Promise<void> {
  for (let round = 0; round < WARM_UP + ROUNDS; round++) {
    for (const c of phase) {
      collectGarbage();
      const start = performance.now();
      await c.run();
      const ms = performance.now() - start;
      if (round >= WARM_UP) c.times.push(ms);
    }
  }
}

for (const g of groups) g.lib.kept = share(kept(words((await library(g.degrees)).data)));
await measure(cases);

const floorMs = median(floor.times);
const cpu = os.cpus();
console.log(
  `Render benchmark: ${W}×${H} RGBA frame (${N} pixels, 32-bit words), ${ROUNDS} interleaved rounds after ${WARM_UP} warm-up, medians;`,
);
console.log("All cases, the library's included, interleaved in one process with the library loaded throughout, after warm-up rounds.");
console.log(
  `Node ${process.version}, ${cpu.length} × ${cpu[0]?.model ?? "unknown CPU"}, load average ${os.loadavg()[0].toFixed(2)} at the end.`,
);
console.log("(a) TypedArray.prototype.set of the whole frame, three times, into planes allocated once.");
console.log("(b) per destination pixel: turn the centre back by θ about the frame's centre, take the source pixel under it (floor),");
console.log("    background when outside; plain JS, output plane allocated once.");
console.log(
  `(c) sharp ${sharp.versions.sharp} / libvips ${sharp.versions.vips}, concurrency 1, cache off. Timed: the whole pipeline, from the raw RGBA`,
);
console.log("    input buffer through .affine([[cos, −sin], [sin, cos]], nearest, transparent background) to the raw output Buffer");
console.log(`    it allocates. Its output is the turned frame's whole bounding box (size in the case name), not ${W}×${H}.`);
console.log("Three-shear render: Renderer.render on the renderer's own planes: pass 1 as block copies, passes 2 and 3 fused (the column");
console.log("gather stores each row shifted by the second row pass). Pass 1: Renderer.render up to pass 1; pass 2: the median of a");
console.log("render up to pass 2 less that of pass 1; pass 3: Renderer.secondRowPass alone, between two planes of the benchmark's.");
console.log("Pixels kept: distinct source pixels in the output. The three-shear wraps at the edges (spec §5), so it keeps all;");
console.log("(b) also loses the corners that turn off the frame, so its share of the pixels whose turned centres land on it is given too.");
console.log("ms: median; best ms: the fastest round (this machine is shared, so the spread shows the noise); ratios use medians.");
console.log(
  "÷ floor: this case's time over the floor's. (b) ÷ and (c) ÷: that reference's time over this case's (above 1: this is faster).",
);
console.log("");

const best = (xs: readonly number[]) => Math.min(...xs).toFixed(2);
const header = ["case", "ms", "best ms", "÷ floor", "(b) ÷", "(c) ÷", "(d) ÷", "pixels kept"];
const rows: string[][] = [[floor.name, median(floor.times).toFixed(2), best(floor.times), "1.00", "", "", "", "(a copy)"]];
for (const g of groups) {
  const naiveMs = median(g.naive.times);
  const libMs = median(g.lib.times);
  const [one, oneTwo, three] = g.passes.map((p) => median(p.times));
  const baseMs = median(g.baseline.times);
  rows.push([g.passes[0].name, one.toFixed(2), best(g.passes[0].times), (one / floorMs).toFixed(2), "", "", "", ""]);
  rows.push([`${g.degrees}° pass 2 (columns)`, (oneTwo - one).toFixed(2), "", ((oneTwo - one) / floorMs).toFixed(2), "", "", "", ""]);
  rows.push([g.passes[2].name, three.toFixed(2), best(g.passes[2].times), (three / floorMs).toFixed(2), "", "", "", ""]);
  const wholeMs = median(g.whole.times);
  rows.push([
    g.whole.name,
    wholeMs.toFixed(2),
    best(g.whole.times),
    (wholeMs / floorMs).toFixed(2),
    (naiveMs / wholeMs).toFixed(2),
    (libMs / wholeMs).toFixed(2),
    (baseMs / wholeMs).toFixed(2),
    g.whole.kept ?? "",
  ]);
  rows.push([
    g.naive.name,
    naiveMs.toFixed(2),
    best(g.naive.times),
    (naiveMs / floorMs).toFixed(2),
    "1.00",
    (libMs / naiveMs).toFixed(2),
    "",
    g.naive.kept ?? "",
  ]);
  rows.push([
    g.lib.name,
    libMs.toFixed(2),
    best(g.lib.times),
    (libMs / floorMs).toFixed(2),
    (naiveMs / libMs).toFixed(2),
    "1.00",
    "",
    g.lib.kept ?? "",
  ]);
  rows.push([
    g.baseline.name,
    baseMs.toFixed(2),
    best(g.baseline.times),
    (baseMs / floorMs).toFixed(2),
    "",
    (libMs / baseMs).toFixed(2),
    "1.00",
    "",
  ]);
}
const widths = header.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i].length)));
const line = (r: readonly string[]) =>
  r.map((cell, i) => (i === 0 || i === r.length - 1 ? cell.padEnd(widths[i]) : cell.padStart(widths[i]))).join("  ");
console.log(line(header));
console.log(widths.map((w) => "-".repeat(w)).join("  "));
for (const r of rows) console.log(line(r).trimEnd());

console.log("");
console.log(`Every angle: the three-shear render alone at ${SWEEP.length} angles, in the same rounds; ÷ floor as above.`);
const sweepRows = sweep.map(({ render }) => {
  const ms = median(render.times);
  return { name: render.name, ms, ratio: ms / floorMs };
});
const perLine = 6;
for (let i = 0; i < sweepRows.length; i += perLine)
  console.log(
    sweepRows
      .slice(i, i + perLine)
      .map((r) => `${r.name.padStart(6)} ${r.ms.toFixed(2).padStart(6)} ms ${r.ratio.toFixed(2).padStart(5)}×`)
      .join("   "),
  );
const worst = sweepRows.reduce((a, b) => (b.ratio > a.ratio ? b : a));
console.log(`Highest: ${worst.ratio.toFixed(2)}× the floor at ${worst.name}.`);
