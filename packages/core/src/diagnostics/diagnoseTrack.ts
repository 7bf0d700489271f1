import type { Effect } from "../effect.ts";
import { measureFrame, pointSymmetric, type FrameDiagnostics } from "../frameDiagnostics.ts";
import type { FrameShifts } from "../render.ts";
import { frameAt, framesDiagnostics, setFrame, type FrameRange, type FramesDiagnostics } from "./diagnoseFrames.ts";
import { defaultWorkers, nodePool } from "./nodePool.ts";
import { mergeDiagnostics, splitFrames } from "./protocol.ts";

/**
 * Below this many pixel checks (frames × canvas pixels) a track is measured on the calling thread alone: about 0.1 s of
 * work on the machine the benchmark ran on, less than starting a worker from source takes (bench/diagnostics.bench.ts).
 */
export const POOL_MIN_CHECKS = 1 << 26;

/** Ranges per thread: small enough that the threads finish together, large enough that messages cost nothing. */
const RANGES_PER_THREAD = 8;

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
 * The diagnostics (spec §6) of every frame of a compiled track, in frame order: on the calling thread, or for a large
 * track spread over worker threads as well (./nodePool.ts). Either way each frame's figures are the same bits.
 */
export function diagnoseTrack(
  effect: Effect,
  frames: readonly (FrameShifts & { readonly degrees: number })[],
  options: DiagnoseOptions = {},
): FrameDiagnostics[] {
  return startTrack(effect, frames, options, false).finish();
}

/** Diagnostics of a track under way (beginDiagnoseTrack). */
export interface PendingDiagnostics {
  /** Hands the worker threads more frames, if any work for them: call it between other work. */
  pump(): void;
  /** The diagnostics of every frame, in frame order, the calling thread measuring its share of what is left. */
  finish(): FrameDiagnostics[];
}

/**
 * diagnoseTrack in two halves, for a caller with other work to do meanwhile (an export writing its text files): a large
 * track's frames go to the worker threads at once, and finish() measures the rest on this thread and gathers all. A
 * track too small for workers, or a platform without them, is measured in finish(). The figures are diagnoseTrack's.
 */
export function beginDiagnoseTrack(
  effect: Effect,
  frames: readonly (FrameShifts & { readonly degrees: number })[],
  options: DiagnoseOptions = {},
): PendingDiagnostics {
  return startTrack(effect, frames, options, true);
}

/**
 * Ranges per thread when the workers start ahead of the caller: finer, so that the caller, joining late, still finds
 * ranges left to take and the threads end together.
 */
const AHEAD_RANGES_PER_THREAD = 32;
/** Ranges handed to each worker ahead of finish() (and topped up by pump()): a quarter of its share. */
const AHEAD_PER_WORKER = AHEAD_RANGES_PER_THREAD / 4;

function startTrack(
  effect: Effect,
  frames: readonly (FrameShifts & { readonly degrees: number })[],
  options: DiagnoseOptions,
  early: boolean,
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
  const each = (result: FramesDiagnostics) => frames.map((_, i) => frameAt(result, i));
  const pool = workers > 0 && frames.length > 1 && frames.length * width * height >= POOL_MIN_CHECKS ? nodePool() : null;
  if (pool === null) return { pump: () => {}, finish: () => each(local({ start: 0, end: frames.length })) };
  const parts = (workers + 1) * (early ? AHEAD_RANGES_PER_THREAD : RANGES_PER_THREAD);
  const run = pool.begin(effect, mask, splitFrames(frames.length, parts), workers, early ? AHEAD_PER_WORKER : 0);
  return { pump: () => run.pump(), finish: () => each(mergeDiagnostics(run.finish(local))) };
}
