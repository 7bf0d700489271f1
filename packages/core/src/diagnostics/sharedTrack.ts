/**
 * A track's diagnostics measured by several threads at once through shared memory: the frame ranges sit in a list, each
 * thread takes the next one with an atomic counter, measures it and writes its figures straight into shared result
 * arrays. No thread hands work to another, so a thread that starts late or runs slowly simply takes fewer ranges, and
 * the asking thread may do other work in between and join in when it wants the results (./nodePool.ts).
 *
 * Nothing here imports Node or the DOM: only SharedArrayBuffer and Atomics.
 */
import type { Effect } from "../effect.ts";
import type { FrameRange, FramesDiagnostics } from "./diagnoseFrames.ts";

/** Type tag of the message that asks a Node diagnostics worker to join a shared track. */
export const TRACK_REQUEST = "skewsmith.diagnostics/track";

/** Range state: measured, its figures stored. */
export const RANGE_DONE = 1;
/** Range state: the thread that took it could not measure it (the asking thread measures it again, to raise the error). */
export const RANGE_FAILED = 2;

/** Slots of `control` before the per-range states. */
const NEXT = 0;
const SETTLED = 1;
const STATES = 2;

/** The shared state of one track: its ranges, who has taken which, and the figures of every frame. */
export interface SharedTrack extends FramesDiagnostics {
  readonly ranges: readonly FrameRange[];
  /** [next range to take, ranges settled (done or failed), then one state per range]. */
  readonly control: Int32Array;
}

/** What a worker is sent to join a track: the effect, an optional mask (shared memory) and the track's shared state. */
export interface TrackRequest extends SharedTrack {
  readonly type: typeof TRACK_REQUEST;
  readonly effect: Effect;
  readonly mask?: Uint8Array;
}

/** A new shared track over `ranges`, which are consecutive and cover frames ranges[0].start … last end − 1. */
export function sharedTrack(ranges: readonly FrameRange[]): SharedTrack {
  const start = ranges[0].start;
  const end = ranges[ranges.length - 1].end;
  const n = end - start;
  const shared = (bytes: number) => new SharedArrayBuffer(bytes);
  return {
    ranges,
    control: new Int32Array(shared(4 * (STATES + ranges.length))),
    start,
    end,
    maxErrorPx: new Float64Array(shared(8 * n)),
    meanErrorPx: new Float64Array(shared(8 * n)),
    wrapped: new Uint32Array(shared(4 * n)),
    clipped: new Uint32Array(shared(4 * n)),
  };
}

/** Copies the figures of one measured range into the track. */
function store(track: SharedTrack, result: FramesDiagnostics): void {
  const o = result.start - track.start;
  track.maxErrorPx.set(result.maxErrorPx, o);
  track.meanErrorPx.set(result.meanErrorPx, o);
  track.wrapped.set(result.wrapped, o);
  track.clipped.set(result.clipped, o);
}

/** Marks range i settled with `state` and wakes a thread waiting for the track. */
export function settle(track: SharedTrack, i: number, state: typeof RANGE_DONE | typeof RANGE_FAILED): void {
  Atomics.store(track.control, STATES + i, state);
  Atomics.add(track.control, SETTLED, 1);
  Atomics.notify(track.control, SETTLED);
}

/**
 * Takes ranges of the track one after another until none is left, measuring each with `measure` and storing its
 * figures. With `catchErrors` (a worker), a range that throws is marked failed and the thread goes on; without (the
 * asking thread), the error is thrown after the track is closed to further takers.
 */
export function takeRanges(track: SharedTrack, measure: (range: FrameRange) => FramesDiagnostics, catchErrors: boolean): void {
  for (;;) {
    const i = Atomics.add(track.control, NEXT, 1);
    if (i >= track.ranges.length) return;
    let result: FramesDiagnostics;
    try {
      result = measure(track.ranges[i]);
    } catch (error) {
      if (!catchErrors) {
        closeTrack(track);
        throw error;
      }
      settle(track, i, RANGE_FAILED);
      continue;
    }
    store(track, result);
    settle(track, i, RANGE_DONE);
  }
}

/** Lets no thread take another range of the track (the ranges already taken are still measured by their takers). */
export function closeTrack(track: SharedTrack): void {
  Atomics.store(track.control, NEXT, track.ranges.length);
}

/** How many ranges are settled. */
export function settledRanges(track: SharedTrack): number {
  return Atomics.load(track.control, SETTLED);
}

/** The state of range i: 0 while open or being measured, RANGE_DONE or RANGE_FAILED. */
export function rangeState(track: SharedTrack, i: number): number {
  return Atomics.load(track.control, STATES + i);
}

/** Sleeps until the settled count differs from `seen` or `ms` milliseconds pass. */
export function waitForRanges(track: SharedTrack, seen: number, ms: number): void {
  Atomics.wait(track.control, SETTLED, seen, ms);
}

/** Measures range i on this thread and stores it (a range given up on, or one whose taker failed: errors are thrown). */
export function measureHere(track: SharedTrack, i: number, measure: (range: FrameRange) => FramesDiagnostics): void {
  store(track, measure(track.ranges[i]));
  if (rangeState(track, i) === 0) settle(track, i, RANGE_DONE);
  else Atomics.store(track.control, STATES + i, RANGE_DONE);
}
