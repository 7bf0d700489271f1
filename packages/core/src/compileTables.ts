import { angleTrack } from "./angleTrack.ts";
import { coefficients } from "./coefficients.ts";
import type { Effect } from "./effect.ts";
import { elementType, type ElementType } from "./elementType.ts";
import { frameAngle } from "./frameAngle.ts";
import { diagnoseTrack, type DiagnoseOptions } from "./diagnostics/diagnoseTrack.ts";
import type { FrameDiagnostics } from "./frameDiagnostics.ts";
import { columnShiftsInto, rowShiftsInto } from "./shiftTable.ts";

/** One compiled frame: its angles (degrees), coefficients (integers scaled by 2^F) and shift tables (whole pixels). */
export interface FrameTables {
  readonly index: number;
  /** θn, the frame's angle reduced into (−180, 180]. */
  readonly degrees: number;
  /** θr, the turn the three shears do after an optional flip. */
  readonly residualDegrees: number;
  readonly flip: boolean;
  /** kα. */
  readonly alpha: number;
  /** kβ. */
  readonly beta: number;
  readonly saturated: boolean;
  /** Row shifts, one per canvas row. */
  readonly h: Int32Array;
  /** Column shifts, one per canvas column. */
  readonly v: Int32Array;
  /** Largest |shift| in h and v. */
  readonly maxAbsShift: number;
}

/** A compiled frame with its diagnostics (spec §6). */
export type CompiledFrame = FrameTables & FrameDiagnostics;

/** Every frame of an effect, compiled, with the element type that holds all of its shifts. */
export interface CompiledTables<F extends FrameTables = CompiledFrame> {
  readonly effect: Effect;
  readonly elementType: ElementType;
  readonly frames: readonly F[];
}

/** Compiles one frame's coefficients and shift tables for an angle in degrees (spec §2–§4). */
export function compileFrame(effect: Effect, index: number, degrees: number): FrameTables {
  const { canvas, pivot, fixedPoint, rounding, halfTurn, columnGroup } = effect;
  const angle = frameAngle(degrees, halfTurn);
  const { alpha, beta, saturated } = coefficients(angle.residualDegrees, fixedPoint);
  const rule = { fraction: fixedPoint.fraction, rounding };
  const h = new Int32Array(canvas.height);
  rowShiftsInto(h, alpha, pivot.y * 2, rule);
  const v = new Int32Array(canvas.width);
  columnShiftsInto(v, beta, pivot.x * 2, columnGroup, rule);
  return { index, ...angle, alpha, beta, saturated, h, v, maxAbsShift: Math.max(maxAbs(h), maxAbs(v)) };
}

/**
 * Options of compileTables: `mask` measures over those pixels only (one byte per canvas pixel, non-zero = measured),
 * say a sprite's opaque pixels; `workers` sets how many worker threads a large track is spread over besides the calling
 * thread (default one less than the cores, in Node; 0: the calling thread only).
 */
export type CompileOptions = DiagnoseOptions;

function maxAbs(table: Int32Array): number {
  let m = 0;
  for (let i = 0; i < table.length; i++) {
    const s = table[i];
    const a = s < 0 ? -s : s;
    if (a > m) m = a;
  }
  return m;
}

/**
 * Tables are cut from shared buffers of at most this many int32 entries (1 MiB): a few allocations for a whole track
 * instead of two per frame, yet small enough for the allocator to hand back memory already touched.
 */
const CHUNK_ENTRIES = 1 << 18;

/** A table compiled once and shared by every frame with the same coefficient. */
interface SharedTable {
  readonly table: Int32Array;
  readonly maxAbs: number;
}

/**
 * Compiles the shift tables of every frame of a validated effect, without diagnostics.
 *
 * A table depends only on its coefficient (the canvas, pivot and rule being the effect's), and a long track repeats
 * coefficients often (4096 frames of a full turn in Q8.8 have about 500 distinct kα), so frames with the same kα share
 * one h table and frames with the same kβ one v table. Treat the tables as read-only: writing to one frame's table
 * writes to every frame that shares it.
 */
export function compileShifts(effect: Effect): CompiledTables<FrameTables> {
  const { canvas, pivot, fixedPoint, rounding, halfTurn, columnGroup } = effect;
  const H = canvas.height;
  const W = canvas.width;
  const rule = { fraction: fixedPoint.fraction, rounding };
  const degrees = angleTrack(effect.angles);
  const rows = new Map<number, SharedTable>();
  const columns = new Map<number, SharedTable>();
  let chunk = new Int32Array(0);
  let used = 0;
  let min = 0;
  let max = 0;
  const take = (n: number, framesLeft: number): Int32Array => {
    if (used + n > chunk.length) {
      // Never more than the rest of the track could use, so a short track allocates little.
      chunk = new Int32Array(Math.max(n, Math.min(CHUNK_ENTRIES, framesLeft * (H + W))));
      used = 0;
    }
    used += n;
    return chunk.subarray(used - n, used);
  };
  const shared = (table: Int32Array): SharedTable => {
    for (let i = 0; i < table.length; i++) {
      const s = table[i];
      if (s < min) min = s;
      else if (s > max) max = s;
    }
    return { table, maxAbs: maxAbs(table) };
  };
  const frames = degrees.map((d, index): FrameTables => {
    const angle = frameAngle(d, halfTurn);
    const { alpha, beta, saturated } = coefficients(angle.residualDegrees, fixedPoint);
    let h = rows.get(alpha);
    if (h === undefined) {
      const table = take(H, degrees.length - index);
      rowShiftsInto(table, alpha, pivot.y * 2, rule);
      h = shared(table);
      rows.set(alpha, h);
    }
    let v = columns.get(beta);
    if (v === undefined) {
      const table = take(W, degrees.length - index);
      columnShiftsInto(table, beta, pivot.x * 2, columnGroup, rule);
      v = shared(table);
      columns.set(beta, v);
    }
    return { index, ...angle, alpha, beta, saturated, h: h.table, v: v.table, maxAbsShift: Math.max(h.maxAbs, v.maxAbs) };
  });
  return { effect, elementType: elementType(min, max), frames };
}

/**
 * Compiles every frame of a validated effect with its diagnostics: what `skewsmith tables` reports (spec §8). A large
 * track's diagnostics are spread over worker threads where Node has them (options.workers); the figures are the same.
 */
export function compileTables(effect: Effect, options: CompileOptions = {}): CompiledTables {
  const shifts = compileShifts(effect);
  return withDiagnostics(shifts, diagnoseTrack(effect, shifts.frames, options));
}

/** Compiled frames with each frame's diagnostics added (in frame order): what compileTables returns. */
export function withDiagnostics(tables: CompiledTables<FrameTables>, diagnostics: readonly FrameDiagnostics[]): CompiledTables {
  return { effect: tables.effect, elementType: tables.elementType, frames: tables.frames.map((f, i) => ({ ...f, ...diagnostics[i] })) };
}
