/**
 * How many colours a sprite needs on its target, and the limit a target profile may set. No server code: the profile
 * form uses the limits too.
 */
import type { Image } from "@skewsmith/core";

/**
 * The range of a target profile's colour limit: at least 2 (the background and one colour), at most 256 (the most a
 * palette PNG can hold: an 8-bit index, PNG specification §11.2.3 PLTE, from memory).
 */
export const SPRITE_COLOURS = { min: 2, max: 256 } as const;

/**
 * The colours a sprite needs on the target: the distinct RGBA values its pixels show, and the background (index 0 of a
 * palette, transparent black for RGBA), which every frame shows wherever the turned picture leaves the canvas bare.
 * Palette entries no pixel uses do not count; two entries of one colour count once.
 */
export function spriteColours(image: Image): number {
  const seen = new Set<number>();
  const key = (r: number, g: number, b: number, a: number) => ((r << 24) | (g << 16) | (b << 8) | a) >>> 0;
  if (image.kind === "indexed") {
    const used = new Set<number>([0]);
    for (const i of image.data) used.add(i);
    for (const i of used) {
      const c = image.palette[i];
      if (c) seen.add(key(c[0], c[1], c[2], c[3]));
    }
    return seen.size;
  }
  seen.add(0);
  const d = image.data;
  for (let p = 0; p < d.length; p += 4) seen.add(key(d[p], d[p + 1], d[p + 2], d[p + 3]));
  return seen.size;
}

/** The message when a sprite has more colours than a profile allows. */
export function tooManyColours(input: { sprite: string; colours: number; profile: string; limit: number; effect?: string }): string {
  const where = input.effect
    ? `${input.effect} is made for the target profile ${input.profile}, which`
    : `the target profile ${input.profile}`;
  return `${input.sprite} uses ${input.colours} colours (the background included); ${where} allows at most ${input.limit}. Reduce its colours, or raise the profile's limit.`;
}
