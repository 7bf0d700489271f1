import { angleTrack } from "../angleTrack.ts";
import { compileFrame } from "../compileTables.ts";
import type { Effect } from "../effect.ts";
import { measureFrame, pointSymmetric, type FrameDiagnostics } from "../frameDiagnostics.ts";

/** Frames start … end − 1 of an effect's angle track (0-based, end exclusive). */
export interface FrameRange {
  readonly start: number;
  readonly end: number;
}

/**
 * The diagnostics of a range of frames as plain typed arrays, one entry per frame (index i is frame start + i): what a
 * worker sends back, its buffers transferred rather than copied.
 */
export interface FramesDiagnostics {
  readonly start: number;
  readonly end: number;
  /** Largest error in pixels (spec §6). */
  readonly maxErrorPx: Float64Array;
  /** Mean error in pixels (spec §6). */
  readonly meanErrorPx: Float64Array;
  /** Pixels that crossed an edge (wrap mode). */
  readonly wrapped: Uint32Array;
  /** Pixels dropped at an edge (clip mode). */
  readonly clipped: Uint32Array;
}

/** Empty diagnostics arrays for `range`, to be filled frame by frame. */
export function framesDiagnostics(range: FrameRange): FramesDiagnostics {
  const n = range.end - range.start;
  return {
    start: range.start,
    end: range.end,
    maxErrorPx: new Float64Array(n),
    meanErrorPx: new Float64Array(n),
    wrapped: new Uint32Array(n),
    clipped: new Uint32Array(n),
  };
}

/** Stores one frame's diagnostics at frame index `index` of `into`. */
export function setFrame(into: FramesDiagnostics, index: number, d: FrameDiagnostics): void {
  const i = index - into.start;
  into.maxErrorPx[i] = d.maxErrorPx;
  into.meanErrorPx[i] = d.meanErrorPx;
  into.wrapped[i] = d.wrapped;
  into.clipped[i] = d.clipped;
}

/** Frame `index` of `from` as a FrameDiagnostics object. */
export function frameAt(from: FramesDiagnostics, index: number): FrameDiagnostics {
  const i = index - from.start;
  return { maxErrorPx: from.maxErrorPx[i], meanErrorPx: from.meanErrorPx[i], wrapped: from.wrapped[i], clipped: from.clipped[i] };
}

/** Checks a frame range against a track of `frames` frames; throws a RangeError naming the bad bound. */
export function checkRange(range: FrameRange, frames: number): void {
  const { start, end } = range;
  if (!Number.isInteger(start) || start < 0 || start >= frames)
    throw new RangeError(`start: ${start} is not allowed; allowed a whole number from 0 to ${frames - 1}`);
  if (!Number.isInteger(end) || end <= start || end > frames)
    throw new RangeError(`end: ${end} is not allowed; allowed a whole number from ${start + 1} to ${frames}`);
}

/**
 * Diagnostics (spec §6) of frames `range` (default: the whole track) of a validated effect, measured over every canvas
 * pixel or over the pixels set in `mask` (one byte per canvas pixel). Compiles each frame's tables itself, so it needs
 * nothing but the effect: this is the work a diagnostics worker does (./protocol.ts), in Node or in a browser, and it
 * imports nothing of either. The results equal compileTables' for the same frames, bit for bit.
 */
export function diagnoseFrames(effect: Effect, range?: FrameRange, mask?: Uint8Array): FramesDiagnostics {
  const degrees = angleTrack(effect.angles);
  const r = range ?? { start: 0, end: degrees.length };
  checkRange(r, degrees.length);
  const { width, height } = effect.canvas;
  if (mask !== undefined && mask.length !== width * height)
    throw new RangeError(`mask: ${mask.length} pixels, expected ${width}×${height} = ${width * height}`);
  const symmetric = mask === undefined || pointSymmetric(mask);
  const out = framesDiagnostics(r);
  for (let i = r.start; i < r.end; i++) setFrame(out, i, measureFrame(compileFrame(effect, i, degrees[i]), effect, mask, symmetric));
  return out;
}
