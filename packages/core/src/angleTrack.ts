import type { AngleTrack } from "./effect.ts";

/** The angle of every frame of a track, in degrees, before normalisation (spec §2). */
export function angleTrack(track: AngleTrack): number[] {
  if ("list" in track) return [...track.list];
  const { from, to, frames, easing, includeEnd } = track.sweep;
  const out = new Array<number>(frames);
  for (let i = 0; i < frames; i++) {
    const t = includeEnd ? (frames === 1 ? 0 : i / (frames - 1)) : i / frames;
    const e = easing === "linear" ? t : (1 - Math.cos(Math.PI * t)) / 2;
    out[i] = from + (to - from) * e;
  }
  return out;
}
