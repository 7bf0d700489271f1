import type { Effect } from "../effect.ts";
import { measureFrame, pointSymmetric, type FrameDiagnostics } from "../frameDiagnostics.ts";
import type { FrameShifts } from "../render.ts";
import { frameAt, framesDiagnostics, setFrame, type FrameRange, type FramesDiagnostics } from "./diagnoseFrames.ts";
import { defaultWorkers, nodePool } from "./nodePool.ts";
import { splitFrames } from "./protocol.ts";

/**
 * Below this many pixel checks (frames × canvas pixels) a track is measured on the calling thread alone: about 0.1 s of
 * work on the machine the benchmark ran on, less than starting a worker from source takes (bench/diagnostics.bench.ts).
 */
export const POOL_MIN_CHECKS = 1 << 26;

/**
 * Ranges per thread: small enough that the threads finish within a few milliseconds of each other (a thread takes the
 * next range from a shared counter), large enough that taking one costs nothing.
 */
const RANGES_PER_THREAD = 32;

/** Options of diagnoseTrack (and compileTables). */
export interface DiagnoseOptions {
  /** Measure over these pixels only (one byte per canvas pixel, non-zero = measured). */
  readonly mask?: Uint8Array;
  /**
   * Worker threads to spread a large track over, besides the calling thread: default one less than the cores (Node),
   * none where there are no worker threads; 0 measures on the calling thread only.
   */
  readonly workers?: number;
}

/**
 * Starts the worker threads that diagnoseTrack will spread a track of `frames` frames of `pixels` canvas pixels over, if
 * it will: a worker takes about a tenth of a second to load, which it can spend beside the caller's reading and
 * compiling instead of after them. `workers` as in DiagnoseOptions; a small track starts none.
 */
export function prepareWorkers(frames: number, pixels: number, workers: number = defaultWorkers()): void {
  if (workers > 0 && frames > 1 && frames * pixels >= POOL_MIN_CHECKS) nodePool()?.grow(workers);
}

/**
 * Like prepareWorkers, for an effect document not yet validated (the JSON an effect file holds, or anything else): reads
 * only the canvas size and the frame count, and starts nothing when they are missing or not numbers.
 */
export function prepareWorkersFor(json: unknown): void {
  const doc = json as { canvas?: { width?: unknown; height?: unknown }; angles?: { list?: unknown; sweep?: { frames?: unknown } } };
  const width = doc?.canvas?.width;
  const height = doc?.canvas?.height;
  const list = doc?.angles?.list;
  const frames = Array.isArray(list) ? list.length : doc?.angles?.sweep?.frames;
  if (typeof width === "number" && typeof height === "number" && typeof frames === "number" && Number.isSafeInteger(frames))
    prepareWorkers(frames, width * height);
}

/** Diagnostics of a track being measured: `finish` returns them (measuring what is left on this thread), `cancel` drops them. */
export interface PendingDiagnostics {
  /** Every frame's diagnostics, in frame order; the calling thread measures the ranges no worker has taken yet. */
  finish(): FrameDiagnostics[];
  /** Lets the workers stop (for a caller that will not call finish, say after an error). */
  cancel(): void;
}

/**
 * Starts measuring the diagnostics (spec §6) of every frame of a compiled track: for a large track, worker threads
 * begin at once (./nodePool.ts) while the caller goes on with other work, and `finish` has the caller join in and
 * returns the figures; otherwise all the work waits for `finish`, on the calling thread. Either way each frame's figures
 * are the same bits. Throws for a bad mask or worker count at once.
 */
export function beginDiagnoseTrack(
  effect: Effect,
  frames: readonly (FrameShifts & { readonly degrees: number })[],
  options: DiagnoseOptions = {},
): PendingDiagnostics {
  const { mask } = options;
  const { width, height } = effect.canvas;
  if (mask !== undefined && mask.length !== width * height)
    throw new RangeError(`mask: ${mask.length} pixels, expected ${width}×${height} = ${width * height}`);
  const workers = options.workers ?? defaultWorkers();
  if (!Number.isInteger(workers) || workers < 0 || workers > 256)
    throw new RangeError(`workers: ${workers} is not allowed; allowed a whole number from 0 to 256`);
  const symmetric = mask === undefined || pointSymmetric(mask);
  const local = (range: FrameRange): FramesDiagnostics => {
    const out = framesDiagnostics(range);
    for (let i = range.start; i < range.end; i++) setFrame(out, i, measureFrame(frames[i], effect, mask, symmetric));
    return out;
  };
  const all = { start: 0, end: frames.length };
  const pool = workers > 0 && frames.length > 1 && frames.length * width * height >= POOL_MIN_CHECKS ? nodePool() : null;
  const pending = pool?.begin(effect, mask, splitFrames(frames.length, (workers + 1) * RANGES_PER_THREAD), workers);
  let done = false;
  return {
    finish() {
      if (done) throw new RangeError("finish: called twice; allowed once per beginDiagnoseTrack");
      done = true;
      const result = pending ? pending.finish(local) : local(all);
      return frames.map((_, i) => frameAt(result, i));
    },
    cancel() {
      done = true;
      pending?.cancel();
    },
  };
}

/**
 * The diagnostics (spec §6) of every frame of a compiled track, in frame order: on the calling thread, or for a large
 * track spread over worker threads as well (./nodePool.ts). Either way each frame's figures are the same bits.
 */
export function diagnoseTrack(
  effect: Effect,
  frames: readonly (FrameShifts & { readonly degrees: number })[],
  options: DiagnoseOptions = {},
): FrameDiagnostics[] {
  return beginDiagnoseTrack(effect, frames, options).finish();
}
