/**
 * renderImage benchmark (issue 10, item 5): one 1920×1080 frame turned by 30° about its centre, RGBA and indexed.
 *
 * Cases, rounds interleaved, medians (ms per call):
 *   renderer        Renderer.render on the renderer's own planes: the internal renderer, the reference;
 *   allocation floor  a new buffer of the image's size filled by one block copy. It runs right after the baseline of
 *                   the round before, whose freed planes the allocator hands back to the system: the first case to take
 *                   fresh memory after that pays the system's first touch of its pages (about 30 ms for 8 MB on this VM,
 *                   against 1 ms for reused memory). Before this case was added, renderImage was that first case, and its
 *                   1.9–7.4× over the renderer was that cost, not the call (the same call into a caller's buffer: 1.0×);
 *   renderImage     the public call (a kept renderer drawing on its own planes, then one block copy into a new buffer);
 *   into a buffer   renderImage with a caller's output buffer;
 *   baseline        renderImage before issue 10 (bench/baseline/renderImage.ts: a new renderer and planes per call,
 *                   then a copy into the output).
 * Second renderer: the internal renderer's time per call alone, then again after a second renderer (another size and
 * kind) has drawn in the same process; the baseline renderer (bench/baseline/render.ts) the same way.
 * A benchmark prints numbers, never verdicts: nothing here passes or fails.
 *
 * Run: `npx tsx bench/renderImage.bench.ts [rounds]` (default 15 rounds after 3 warm-up rounds).
 */
import os from "node:os";
import { compileFrame } from "../src/compileTables.ts";
import { parseEffect } from "../src/effect.ts";
import { imagePlane, type Image } from "../src/image.ts";
import { Renderer } from "../src/render.ts";
import { renderImage } from "../src/renderImage.ts";
import { Renderer as BaselineRenderer } from "./baseline/render.ts";
import { renderImage as baselineRenderImage } from "./baseline/renderImage.ts";
import { collectGarbage, median } from "./support.ts";

const W = 1920;
const H = 1080;
const ROUNDS = Number(process.argv[2] ?? 15);
const WARM_UP = 3;

interface Case {
  readonly name: string;
  readonly run: () => unknown;
  readonly times: number[];
}

function measure(cases: readonly Case[], rounds = ROUNDS, warmUp = WARM_UP): void {
  for (let round = 0; round < warmUp + rounds; round++)
    for (const c of cases) {
      collectGarbage();
      const start = performance.now();
      c.run();
      if (round >= warmUp) c.times.push(performance.now() - start);
    }
}

const effect = parseEffect({ canvas: { width: W, height: H }, pivot: { x: W / 2, y: H / 2 }, angles: { list: [30] } });
const frame = compileFrame(effect, 0, 30);
const rgba: Image = { kind: "rgba", width: W, height: H, data: Uint8Array.from({ length: W * H * 4 }, (_, i) => (i * 2654435761) >>> 24) };
const indexed: Image = {
  kind: "indexed",
  width: W,
  height: H,
  data: Uint8Array.from({ length: W * H }, (_, i) => ((i * 2654435761) >>> 28) & 15),
  palette: Array.from({ length: 16 }, (_, i) => [i * 16, 255 - i * 16, 128, i === 0 ? 0 : 255] as const),
};

const rows: string[][] = [];
for (const image of [rgba, indexed]) {
  const plane = imagePlane(image);
  const renderer = image.kind === "rgba" ? new Renderer(W, H, Uint32Array) : new Renderer(W, H, Uint8Array);
  const out = new Uint8Array(image.data.length);
  const reference: Case = {
    name: `${image.kind} renderer (internal)`,
    run: () => (renderer as Renderer<typeof plane>).render(plane, frame, effect),
    times: [],
  };
  const fresh: Case = {
    name: `${image.kind} a new buffer, one block copy (allocation floor)`,
    run: () => new Uint8Array(image.data.length).set(image.data),
    times: [],
  };
  const cases: Case[] = [
    reference,
    fresh,
    { name: `${image.kind} renderImage`, run: () => renderImage(image, frame, effect), times: [] },
    { name: `${image.kind} renderImage into a buffer`, run: () => renderImage(image, frame, effect, 3, out), times: [] },
    { name: `${image.kind} baseline renderImage (before issue 10)`, run: () => baselineRenderImage(image, frame, effect), times: [] },
  ];
  measure(cases);
  const ref = median(reference.times);
  const alloc = median(fresh.times);
  for (const c of cases) {
    const ms = median(c.times);
    const withAlloc = c.name.endsWith(" renderImage") ? (ms / (ref + alloc)).toFixed(2) : "";
    rows.push([c.name, ms.toFixed(2), Math.min(...c.times).toFixed(2), Math.max(...c.times).toFixed(2), (ms / ref).toFixed(2), withAlloc]);
  }
}

// A second renderer in the same process: each renderer's time per call before and after another one has drawn.
const plane = imagePlane(rgba) as Uint32Array;
const fresh = {
  now: new Renderer<Uint32Array<ArrayBufferLike>>(W, H, Uint32Array),
  before: new BaselineRenderer<Uint32Array<ArrayBufferLike>>(W, H, Uint32Array),
};
const alone: Case[] = [
  { name: "renderer, alone", run: () => fresh.now.render(plane, frame, effect), times: [] },
  { name: "baseline renderer, alone", run: () => fresh.before.render(plane, frame, effect), times: [] },
];
measure(alone);
const smallEffect = parseEffect({ canvas: { width: 640, height: 360 }, pivot: { x: 320, y: 180 }, angles: { list: [30] } });
const smallFrame = compileFrame(smallEffect, 0, 30);
const smallPlane = new Uint8Array(640 * 360).fill(3);
const second = { now: new Renderer(640, 360, Uint8Array), before: new BaselineRenderer(640, 360, Uint8Array) };
for (let i = 0; i < 20; i++) {
  second.now.render(smallPlane, smallFrame, smallEffect);
  second.before.render(smallPlane, smallFrame, smallEffect);
}
const after: Case[] = [
  { name: "renderer, after a second one drew", run: () => fresh.now.render(plane, frame, effect), times: [] },
  { name: "baseline renderer, after a second one drew", run: () => fresh.before.render(plane, frame, effect), times: [] },
];
measure(after);
for (let i = 0; i < 2; i++) {
  const a = median(alone[i].times);
  const b = median(after[i].times);
  rows.push([alone[i].name, a.toFixed(2), Math.min(...alone[i].times).toFixed(2), Math.max(...alone[i].times).toFixed(2), "1.00", ""]);
  rows.push([
    after[i].name,
    b.toFixed(2),
    Math.min(...after[i].times).toFixed(2),
    Math.max(...after[i].times).toFixed(2),
    (b / a).toFixed(2),
    "",
  ]);
}

const cpu = os.cpus();
console.log(
  `renderImage benchmark: one ${W}×${H} frame at 30° about the centre, medians of ${ROUNDS} interleaved rounds after ${WARM_UP} warm-up;`,
);
console.log(
  `Node ${process.version}, ${cpu.length} × ${cpu[0]?.model ?? "unknown CPU"}, load average ${os.loadavg()[0].toFixed(2)} at the end.`,
);
console.log("ratio: this case's median over the internal renderer's of the same pixel kind (target for renderImage: at most 1.2);");
console.log(
  "÷ (renderer + alloc): a new result's median over the renderer's plus the allocation floor's (a new buffer of the image's size",
);
console.log(
  "filled by one block copy): what a call returning fresh memory cannot go below, since the system's first touch of new pages is",
);
console.log("paid by whoever writes them first (on this VM, about 30 ms for 8 MB when the freed memory is not reused).");
console.log("for the second-renderer rows, the time per call after a second renderer drew over the time before (target: 1.0).");
console.log("");
const header = ["case", "ms", "min", "max", "ratio", "÷ (renderer + alloc)"];
const widths = header.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i].length)));
const line = (r: readonly string[]) => r.map((cell, i) => (i === 0 ? cell.padEnd(widths[i]) : cell.padStart(widths[i]))).join("  ");
console.log(line(header));
console.log(widths.map((w) => "-".repeat(w)).join("  "));
for (const r of rows) console.log(line(r).trimEnd());
