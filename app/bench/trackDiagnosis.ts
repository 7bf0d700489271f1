/**
 * Every frame's tables and diagnostics for the per-frame table, through core (over the sprite's opaque pixels and over
 * the key pixels). No DOM and no React: the bench's Web Worker runs it, and so does the server for the saved effect's
 * diagnostics, so the two can never disagree.
 */
import {
  angleTrack,
  compileShifts,
  diagnoseFrames,
  type CompiledTables,
  type Effect,
  type FrameTables,
  type FramesDiagnostics,
} from "@skewsmith/core";
import { Renderers } from "./renderers.ts";
import type { BenchSource } from "./source.ts";

/** One row of the per-frame table. */
export interface FrameRow {
  index: number;
  /** The angle as the track gives it (degrees, before normalising). */
  written: number;
  degrees: number;
  residualDegrees: number;
  flip: boolean;
  alpha: number;
  beta: number;
  saturated: boolean;
  maxAbsShift: number;
  maxErrorPx: number;
  meanErrorPx: number;
  wrapped: number;
  clipped: number;
  /** Largest error over the key pixels, or null when none are marked. */
  keyMaxErrorPx: number | null;
  /** Pairs of key pixels that touched in the source and no longer do (or were lost), or null when none are marked. */
  keyApart: number | null;
}

/** About how many pixel checks one step of TrackDiagnosis makes at most (one frame at least). */
const DIAGNOSE_PIXELS_PER_STEP = 1 << 20;

/**
 * Measures a whole track frame by frame, so a caller can stop between frames, show rows as they come, or give up when
 * the settings changed. Core's diagnoseFrames does the measuring (with the sprite's mask and with the key pixels'),
 * and core's Renderer follows the key pixels to count the neighbours that came apart.
 */
export class TrackDiagnosis {
  readonly tables: CompiledTables<FrameTables>;
  readonly written: number[];
  private next = 0;
  private readonly keyPlane: Uint16Array | null;
  private readonly renderers: Renderers;

  constructor(
    readonly effect: Effect,
    readonly source: BenchSource,
    tables?: CompiledTables<FrameTables>,
  ) {
    this.tables = tables ?? compileShifts(effect);
    this.written = angleTrack(effect.angles);
    this.renderers = new Renderers(effect.canvas.width, effect.canvas.height);
    if (source.keys.length > 0) {
      this.keyPlane = new Uint16Array(source.width * source.height);
      source.keys.forEach(([x, y], k) => (this.keyPlane![y * source.width + x] = k + 1));
    } else this.keyPlane = null;
  }

  get total(): number {
    return this.tables.frames.length;
  }

  get done(): number {
    return this.next;
  }

  /**
   * Measures frames until `deadline` (a performance.now() time) or the end, at least one; returns their rows. The
   * errors and edge counts come from core's diagnoseFrames, the module the command line's worker threads run, a few
   * frames at a time (fewer on a big canvas, so a new message never waits long).
   */
  step(deadline = Infinity): FrameRow[] {
    const rows: FrameRow[] = [];
    const { frames } = this.tables;
    const { effect, source } = this;
    const chunk = Math.max(1, Math.min(8, Math.floor(DIAGNOSE_PIXELS_PER_STEP / (source.width * source.height))));
    do {
      if (this.next >= frames.length) break;
      const range = { start: this.next, end: Math.min(frames.length, this.next + chunk) };
      const d = diagnoseFrames(effect, range, source.mask ?? undefined);
      const keys = source.keyMask && this.keyPlane ? diagnoseFrames(effect, range, source.keyMask) : null;
      for (let i = range.start; i < range.end; i++) rows.push(this.row(frames[i], d, keys));
      this.next = range.end;
    } while (performance.now() < deadline);
    return rows;
  }

  /** Every remaining row at once. */
  all(): FrameRow[] {
    return this.step(Infinity);
  }

  private row(frame: FrameTables, d: FramesDiagnostics, keys: FramesDiagnostics | null): FrameRow {
    const i = frame.index - d.start;
    let keyMaxErrorPx: number | null = null;
    let keyApart: number | null = null;
    if (keys && this.keyPlane) {
      keyMaxErrorPx = keys.maxErrorPx[i];
      keyApart = this.apart(frame);
    }
    return {
      index: frame.index,
      written: this.written[frame.index],
      degrees: frame.degrees,
      residualDegrees: frame.residualDegrees,
      flip: frame.flip,
      alpha: frame.alpha,
      beta: frame.beta,
      saturated: frame.saturated,
      maxAbsShift: frame.maxAbsShift,
      maxErrorPx: d.maxErrorPx[i],
      meanErrorPx: d.meanErrorPx[i],
      wrapped: d.wrapped[i],
      clipped: d.clipped[i],
      keyMaxErrorPx,
      keyApart,
    };
  }

  /** Key-pixel pairs that touched in the source and do not touch in the frame (a lost pixel touches nothing). */
  private apart(frame: FrameTables): number {
    const out = this.renderers.for(this.keyPlane!).render(this.keyPlane!, frame, this.effect, 3);
    const at = keyDestinations(out, this.source.keys.length);
    let apart = 0;
    for (const [i, j] of this.source.keyPairs) {
      const a = at[i];
      const b = at[j];
      if (a < 0 || b < 0) apart++;
      else {
        const w = this.source.width;
        if (Math.max(Math.abs((a % w) - (b % w)), Math.abs(Math.floor(a / w) - Math.floor(b / w))) > 1) apart++;
      }
    }
    return apart;
  }
}

/** Where each marked pixel (value k + 1 in a rendered plane) landed, as a pixel index, or −1 when it was lost. */
function keyDestinations(plane: ArrayLike<number>, count: number): Int32Array {
  const at = new Int32Array(count).fill(-1);
  for (let i = 0; i < plane.length; i++) {
    const v = plane[i];
    if (v !== 0) at[v - 1] = i;
  }
  return at;
}
/** Pixels times frames, the work of measuring a whole track: the server measures only up to a limit. */
export function diagnosisCost(effect: Effect): number {
  const frames = "list" in effect.angles ? effect.angles.list.length : effect.angles.sweep.frames;
  return effect.canvas.width * effect.canvas.height * frames;
}
