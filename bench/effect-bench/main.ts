/**
 * The page the bench benchmark runs in Chromium: the bench's own worker and drawing code on the demo's storm effect
 * (256 × 224, 48 frames), each figure next to a baseline measured here in the same run.
 */
import { compileShifts, parseEffect } from "@skewsmith/core";
import { drawFrame, NO_OVERLAYS, PixelStage } from "../../app/bench/draw.ts";
import type { FromWorker, ToWorker } from "../../app/bench/protocol.ts";

const STORM = parseEffect({
  canvas: { width: 256, height: 224 },
  pivot: { x: 128, y: 112 },
  angles: { sweep: { from: -12, to: 12, frames: 48, easing: "ease-in-out", includeEnd: true } },
  columnGroup: 16,
});
const ZOOM = 3;
const W = STORM.canvas.width;
const H = STORM.canvas.height;

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
/** Browsers round performance.now() to about 0.1 ms, so short steps are timed in batches: the median of batch times ÷ batch size. */
const BATCH = 24;

const worker = new Worker(new URL("../../app/bench/bench.worker.ts", import.meta.url), { type: "module" });
const waiting = new Map<string, (m: FromWorker) => void>();
worker.onmessage = (e: MessageEvent<FromWorker>) => {
  const m = e.data;
  const key = m.type === "frame" ? `frame:${m.request}` : m.type === "diagnosed" || m.type === "error" ? `load:${m.generation}` : "";
  waiting.get(key)?.(m);
  waiting.delete(key);
};
const reply = (key: string, send: ToWorker) =>
  new Promise<FromWorker>((resolve) => {
    waiting.set(key, resolve);
    worker.postMessage(send);
  });

let generation = 0;
/** A settings change: the pivot moves half a pixel, so every table and diagnostic is computed anew. */
const load = (pivotX: number) => {
  generation++;
  return reply(`load:${generation}`, {
    type: "load",
    generation,
    document: { ...STORM, pivot: { x: pivotX, y: 112 } },
    sprite: { id: "storm", url: "/storm.png" },
    spriteX: null,
    spriteY: null,
    keyPixels: [],
    align: 1,
  });
};

async function run() {
  const rounds = Number(new URLSearchParams(location.search).get("rounds") ?? 15);
  const out: Record<string, number> = {};

  // Tables and diagnostics of the whole track after a settings change, through the worker (load to last row).
  await load(128);
  const track: number[] = [];
  for (let i = 0; i < rounds; i++) {
    const t = performance.now();
    const m = await load(i % 2 === 0 ? 128.5 : 128);
    if (m.type === "error") throw new Error(m.message);
    track.push(performance.now() - t);
  }
  out.trackMs = median(track);
  // Baseline: core's tables alone, no diagnostics, on this page's thread.
  const tables: number[] = [];
  for (let i = 0; i < rounds * 4; i++) {
    const t = performance.now();
    compileShifts({ ...STORM, pivot: { x: i % 2 === 0 ? 128.5 : 128, y: 112 } });
    tables.push(performance.now() - t);
  }
  out.tablesMs = median(tables);

  // One frame computed in the worker and drawn at zoom 3, against one putImageData of the same canvas's pixels.
  const preview = document.getElementById("preview") as HTMLCanvasElement;
  preview.width = W * ZOOM;
  preview.height = H * ZOOM;
  const ctx = preview.getContext("2d")!;
  const stage = new PixelStage();
  let request = 0;
  const frame = async (index: number) => {
    request++;
    const m = await reply(`frame:${request}`, {
      type: "frame",
      request,
      index,
      pass: 3,
      wants: { marks: false, error: false, keys: false },
    });
    if (m.type !== "frame") throw new Error("no frame");
    return m;
  };
  const draw = (m: Extract<FromWorker, { type: "frame" }>) => {
    drawFrame(ctx, stage, {
      picture: m.picture,
      width: W,
      height: H,
      zoom: ZOOM,
      degrees: m.degrees,
      pivot: STORM.pivot,
      outline: null,
      overlays: NO_OVERLAYS,
    });
    ctx.getImageData(0, 0, 1, 1); // wait for the drawing to land in the buffer
  };
  const batches = async (step: (i: number) => unknown) => {
    const times: number[] = [];
    for (let b = 0; b < rounds; b++) {
      const t = performance.now();
      for (let i = 0; i < BATCH; i++) await step(b * BATCH + i);
      times.push((performance.now() - t) / BATCH);
    }
    return median(times);
  };
  await batches(async (i) => draw(await frame(i % 48)));
  out.frameMs = await batches(async (i) => draw(await frame(i % 48)));
  // Where a frame's time goes: the drawing alone, and the worker's part (round trip included).
  const one = await frame(7);
  out.drawMs = await batches(() => draw(one));
  out.workerMs = await batches((i) => frame(i % 48));

  const baseline = document.getElementById("baseline") as HTMLCanvasElement;
  baseline.width = W * ZOOM;
  baseline.height = H * ZOOM;
  const bctx = baseline.getContext("2d")!;
  const pixels = new ImageData(new Uint8ClampedArray(W * ZOOM * H * ZOOM * 4).fill(200), W * ZOOM, H * ZOOM);
  out.putImageDataMs = await batches((i) => {
    pixels.data[(i * 4) % pixels.data.length] = i & 255;
    bctx.putImageData(pixels, 0, 0);
    bctx.getImageData(0, 0, 1, 1);
  });
  return out;
}

(window as unknown as { benchResult: Promise<Record<string, number>> }).benchResult = run();
