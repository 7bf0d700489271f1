/**
 * The page the bench benchmark runs in Chromium: the bench's own worker and drawing code on the demo's storm effect
 * (256 × 224, 48 frames), each figure next to a baseline measured here in the same run.
 */
import { compileShifts, parseEffect } from "@skewsmith/core";
import { drawFrame, NO_OVERLAYS, PixelStage } from "../../app/bench/draw.ts";
import { FrameFeed, recyclable } from "../../app/bench/frameFeed.ts";
import type { FromWorker, ToWorker } from "../../app/bench/protocol.ts";
import type { FrameAnswer, FrameAsk } from "../../app/bench/useBenchWorker.ts";

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

  // One frame at zoom 3: the bench's worker computes it (render, colours, zoom) and the page draws it.
  const preview = document.getElementById("preview") as HTMLCanvasElement;
  preview.width = W * ZOOM;
  preview.height = H * ZOOM;
  const ctx = preview.getContext("2d")!;
  const stage = new PixelStage();
  let request = 0;
  const ask = async (want: FrameAsk): Promise<FrameAnswer> => {
    request++;
    const m = await reply(`frame:${request}`, { type: "frame", request, ...want });
    if (m.type !== "frame") throw new Error("no frame");
    return { index: m.index, pass: m.pass, degrees: m.degrees, picture: m.picture, display: m.display, generation: m.generation };
  };
  const wants = { marks: false, error: false, keys: false };
  const frameAsk = (index: number): FrameAsk => ({ index, pass: 3, wants, zoom: ZOOM, shade: false });
  const draw = (a: FrameAnswer, zoomed = true) => {
    drawFrame(ctx, stage, {
      picture: a.picture,
      display: zoomed ? a.display : null,
      width: W,
      height: H,
      zoom: ZOOM,
      degrees: a.degrees,
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

  // Playback as the preview does it (FrameFeed: frames asked ahead, a small cache), the page drawing each frame as it
  // is shown. Per frame: the wall time (bounded by the worker when it is the slower side) and the page's own part.
  let pageMs = 0;
  let shownCount = 0;
  let shown: (() => void) | null = null;
  const recycle = (a: FrameAnswer) => {
    const buffers = recyclable(a);
    worker.postMessage({ type: "recycle", buffers } satisfies ToWorker, buffers);
  };
  const feed = new FrameFeed(
    ask,
    (a) => {
      const t = performance.now();
      draw(a);
      pageMs += performance.now() - t;
      shownCount++;
      shown?.();
    },
    { release: recycle },
  );
  const play = (i: number) =>
    new Promise<void>((resolve) => {
      const before = shownCount;
      shown = () => shownCount > before && resolve();
      feed.want({ ...frameAsk(i % 48), generation, frames: 48, playing: true });
    });
  await batches(play);
  pageMs = 0;
  shownCount = 0;
  out.playbackMs = await batches(play);
  out.playbackPageMs = pageMs / shownCount;

  // A jump to a frame not in the feed's cache (paused, 5 frames on each time, so every one misses): computed in the
  // worker, the round trip and the drawing included.
  let arrived: (() => void) | null = null;
  const jumps = new FrameFeed(
    ask,
    (a) => {
      draw(a);
      arrived?.();
    },
    { release: recycle },
  );
  const jump = (i: number) =>
    new Promise<void>((resolve) => {
      arrived = resolve;
      jumps.want({ ...frameAsk((i * 5) % 48), generation, frames: 48, playing: false });
    });
  await batches(jump);
  out.frameMs = await batches(jump);
  // Where that time goes: the drawing alone, the worker's part (round trip included), and the old way of drawing
  // (the 1× pixels on a stage canvas, scaled by drawImage).
  const one = await ask(frameAsk(7));
  out.drawMs = await batches(() => draw(one));
  out.drawScaledMs = await batches(() => draw(one, false));
  out.workerMs = await batches(async (i) => recycle(await ask(frameAsk(i % 48))));

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
