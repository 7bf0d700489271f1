/// <reference lib="webworker" />
/**
 * The bench's Web Worker: all of core's heavy work for the page (tables, diagnostics, frames, budget, export bundle),
 * so the page stays responsive whatever the effect's size. Loaded with
 * `new Worker(new URL("./bench.worker.ts", import.meta.url), { type: "module" })`.
 */
import { decodePng, exportBudget, exportBundle, type Image } from "@skewsmith/core";
import { frameDisplay } from "./display.ts";
import { FramePainter } from "./framePainter.ts";
import { fitAdvice, outline, prepareSource } from "./source.ts";
import { TrackDiagnosis } from "./trackDiagnosis.ts";
import type { FromWorker, ToWorker } from "./protocol.ts";

declare const self: DedicatedWorkerGlobalScope;

/** How long the worker measures before it lets waiting messages in (a new load, a frame), in milliseconds. */
const SLICE_MS = 12;

const sprites = new Map<string, Promise<Image>>();
let generation = 0;
/** Settles when the latest load has its tables and source, so frame requests can wait for it. */
let markReady: () => void = () => {};
let ready = new Promise<void>((resolve) => (markReady = resolve));
let current: { diagnosis: TrackDiagnosis; painter: FramePainter; generation: number; load: Extract<ToWorker, { type: "load" }> } | null =
  null;

/** Buffers handed back by the page, reused for frames' pixels (a few frames' worth at most). */
const spares: ArrayBuffer[] = [];
const SPARES = 8;

function spare(bytes: number): ArrayBuffer | undefined {
  const i = spares.findIndex((b) => b.byteLength === bytes);
  return i < 0 ? undefined : spares.splice(i, 1)[0];
}

function post(message: FromWorker, transfer: Transferable[] = []) {
  self.postMessage(message, transfer);
}

/** Lets queued messages run before going on (a message to ourselves, not a timer, so there is no clamped delay). */
const yieldChannel = new MessageChannel();
const waiting: (() => void)[] = [];
yieldChannel.port1.onmessage = () => waiting.shift()?.();
const letMessagesIn = () =>
  new Promise<void>((resolve) => {
    waiting.push(resolve);
    yieldChannel.port2.postMessage(0);
  });

function sprite(url: string): Promise<Image> {
  let image = sprites.get(url);
  if (!image) {
    image = fetch(url, { credentials: "same-origin" }).then(async (response) => {
      if (!response.ok) throw new Error(`the sprite could not be fetched (${response.status})`);
      return decodePng(new Uint8Array(await response.arrayBuffer()));
    });
    image.catch(() => sprites.delete(url));
    sprites.set(url, image);
  }
  return image;
}

async function load(message: Extract<ToWorker, { type: "load" }>) {
  const mine = message.generation;
  generation = mine;
  if (current) ready = new Promise<void>((resolve) => (markReady = resolve));
  const started = performance.now();
  try {
    const image = message.sprite ? await sprite(message.sprite.url) : null;
    if (generation !== mine) return;
    const { document: effect } = message;
    const source = prepareSource(effect, image, message.spriteX, message.spriteY, message.keyPixels);
    const diagnosis = new TrackDiagnosis(effect, source);
    const painter = new FramePainter(effect, source, diagnosis.tables);
    current = { diagnosis, painter, generation: mine, load: message };
    markReady();
    const lines = outline(source);
    post(
      {
        type: "loaded",
        generation: mine,
        frames: diagnosis.total,
        elementType: diagnosis.tables.elementType,
        outline: lines,
        sourceColours: painter.sourceColours,
        content: source.content,
        sprite:
          image && source.placement ? { width: image.width, height: image.height, kind: image.kind, placement: source.placement } : null,
        keys: source.keys.map(([x, y]) => [x, y]),
      },
      [lines.buffer],
    );
    while (diagnosis.done < diagnosis.total) {
      const rows = diagnosis.step(performance.now() + SLICE_MS);
      post({ type: "rows", generation: mine, rows, done: diagnosis.done, total: diagnosis.total });
      await letMessagesIn();
      if (generation !== mine) return;
    }
    post({ type: "diagnosed", generation: mine, ms: performance.now() - started });
    await letMessagesIn();
    if (generation !== mine) return;
    post({ type: "fit", generation: mine, fit: fitAdvice(effect, source, message.align) });
  } catch (error) {
    if (generation !== mine) return;
    // Frames keep coming from the last load that worked.
    if (current) markReady();
    post({ type: "error", generation: mine, message: error instanceof Error ? error.message : String(error) });
  }
}

async function frame(message: Extract<ToWorker, { type: "frame" }>) {
  await ready;
  if (!current) return;
  try {
    const index = Math.min(message.index, current.diagnosis.total - 1);
    const { width, height } = current.painter.effect.canvas;
    const picture = current.painter.paint(index, message.pass, message.wants, spare(width * height * 4));
    const display = frameDisplay(picture, width, height, message.zoom, message.shade, spare(width * height * message.zoom ** 2 * 4));
    const transfer: Transferable[] = [picture.rgba.buffer];
    if (display) transfer.push(display.pixels.buffer);
    for (const part of [picture.wrapped, picture.lost, picture.error, picture.keys]) if (part) transfer.push(part.buffer);
    const degrees = current.diagnosis.tables.frames[index].degrees;
    post(
      { type: "frame", generation: current.generation, request: message.request, index, pass: message.pass, degrees, picture, display },
      transfer,
    );
  } catch (error) {
    post({ type: "error", generation: current.generation, message: error instanceof Error ? error.message : String(error) });
  }
}

function budget(message: Extract<ToWorker, { type: "budget" }>) {
  try {
    post({ type: "budget", job: message.job, report: exportBudget(message.document, message.options), error: null });
  } catch (error) {
    post({ type: "budget", job: message.job, report: null, error: error instanceof Error ? error.message : String(error) });
  }
}

function exportFiles(message: Extract<ToWorker, { type: "export" }>) {
  try {
    const bundle = exportBundle(message.document, message.options, (done, total, step) =>
      post({ type: "export-progress", job: message.job, done, total, step }),
    );
    const files = bundle.files.map((f) => ({ name: f.name, bytes: f.bytes.slice(), text: f.text !== null }));
    post(
      { type: "export", job: message.job, files, error: null },
      files.map((f) => f.bytes.buffer),
    );
  } catch (error) {
    post({ type: "export", job: message.job, files: null, error: error instanceof Error ? error.message : String(error) });
  }
}

self.onmessage = (event: MessageEvent<ToWorker>) => {
  const message = event.data;
  switch (message.type) {
    case "load":
      void load(message);
      break;
    case "frame":
      void frame(message);
      break;
    case "recycle":
      for (const b of message.buffers) if (b.byteLength > 0) spares.push(b);
      spares.splice(0, Math.max(0, spares.length - SPARES));
      break;
    case "budget":
      budget(message);
      break;
    case "export":
      exportFiles(message);
      break;
  }
};
