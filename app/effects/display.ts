/**
 * Plain-words descriptions of effect settings for the pages. No runtime imports, so the browser bundle
 * stays free of the core and of zod.
 */
import type { AngleTrack } from "@skewsmith/core";

/** Size of a new effect's canvas when no target profile gives one, in pixels. */
export const NEW_EFFECT_CANVAS = 64;
/** Frames in a new effect's angle track: one full turn in 64 steps of 5.625°. */
export const NEW_EFFECT_FRAMES = 64;

/** Q notation of a signed fixed-point format, with the sign counted among the integer bits: 16 bits, 8 fraction → "Q8.8". */
export function qNotation(fixedPoint: { bits: number; fraction: number }): string {
  return `Q${fixedPoint.bits - fixedPoint.fraction}.${fixedPoint.fraction}`;
}

/** The angle track in words, say "sweep 0° → 360°, 64 frames, linear". */
export function describeAngles(angles: AngleTrack): string {
  if ("list" in angles) return `list of ${angles.list.length} angle${angles.list.length === 1 ? "" : "s"}`;
  const s = angles.sweep;
  return `sweep ${s.from}° → ${s.to}°, ${s.frames} frame${s.frames === 1 ? "" : "s"}, ${s.easing}${s.includeEnd ? ", end included" : ""}`;
}
