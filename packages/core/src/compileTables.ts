import { angleTrack } from "./angleTrack.ts";
import { coefficients } from "./coefficients.ts";
import type { Effect } from "./effect.ts";
import { elementType, type ElementType } from "./elementType.ts";
import { frameAngle } from "./frameAngle.ts";
import { frameDiagnostics, type FrameDiagnostics } from "./frameDiagnostics.ts";
import { columnShifts, rowShifts } from "./shiftTable.ts";

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
  const h = rowShifts(alpha, canvas.height, pivot.y * 2, rule);
  const v = columnShifts(beta, canvas.width, pivot.x * 2, columnGroup, rule);
  let maxAbsShift = 0;
  for (const s of h) maxAbsShift = Math.max(maxAbsShift, Math.abs(s));
  for (const s of v) maxAbsShift = Math.max(maxAbsShift, Math.abs(s));
  return { index, ...angle, alpha, beta, saturated, h, v, maxAbsShift };
}

/** Options of compileTables. */
export interface CompileOptions {
  /** Measure over these pixels only (one byte per canvas pixel, non-zero = measured), say a sprite's opaque pixels. */
  readonly mask?: Uint8Array;
}

function tablesElementType(frames: readonly FrameTables[]): ElementType {
  let min = 0;
  let max = 0;
  for (const f of frames)
    for (const table of [f.h, f.v])
      for (const s of table) {
        if (s < min) min = s;
        else if (s > max) max = s;
      }
  return elementType(min, max);
}

/** Compiles the shift tables of every frame of a validated effect, without diagnostics. */
export function compileShifts(effect: Effect): CompiledTables<FrameTables> {
  const frames = angleTrack(effect.angles).map((degrees, i) => compileFrame(effect, i, degrees));
  return { effect, elementType: tablesElementType(frames), frames };
}

/** Compiles every frame of a validated effect with its diagnostics: what `skewsmith tables` reports (spec §8). */
export function compileTables(effect: Effect, options: CompileOptions = {}): CompiledTables {
  const { elementType: type, frames } = compileShifts(effect);
  return {
    effect,
    elementType: type,
    frames: frames.map((f) => ({ ...f, ...frameDiagnostics(f, effect, options.mask) })),
  };
}
