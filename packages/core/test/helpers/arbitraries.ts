import fc from "fast-check";
import {
  EDGES,
  HALF_TURNS,
  ROUNDINGS,
  angleTrack,
  compileFrame,
  parseEffect,
  type Bits,
  type Effect,
  type FrameTables,
} from "../../src/index.ts";

/**
 * Angles where the spec's rules change (§2): the quarter turns, just past them (the first angle that flips), half a
 * degree past them, and either side of the half turn (−180° normalises to 180°).
 */
export const BOUNDARY_ANGLES = [90, -90, 90.0001, -90.0001, 90.5, -90.5, 179.9, -179.9, 180, -180] as const;

/**
 * Angles that really turn: multiples of 1/8° in ±720° (every eighth of a degree of two whole turns either way, so every
 * quadrant, the flip and the normalisation are drawn alike), or one of the boundary angles. A plain fc.double would
 * mostly draw 0 and tiny values, which turn nothing.
 */
export const turningAngle: fc.Arbitrary<number> = fc.oneof(
  { weight: 4, arbitrary: fc.integer({ min: -720 * 8, max: 720 * 8 }).map((n) => n / 8) },
  { weight: 1, arbitrary: fc.constantFrom(...BOUNDARY_ANGLES) },
);

/** Any valid effect on a small canvas (at most `maxSide` pixels a side) with one frame at a turning angle. */
export function smallEffect(options: { maxSide?: number; edges?: "wrap" | "clip"; centred?: boolean } = {}): fc.Arbitrary<Effect> {
  const maxSide = options.maxSide ?? 20;
  return fc
    .record({
      width: fc.integer({ min: 1, max: maxSide }),
      height: fc.integer({ min: 1, max: maxSide }),
      px: fc.nat(),
      py: fc.nat(),
      angle: turningAngle,
      bits: fc.constantFrom<Bits>(8, 16, 32),
      fraction: fc.nat(),
      rounding: fc.constantFrom(...ROUNDINGS),
      halfTurn: fc.constantFrom(...HALF_TURNS),
      edges: options.edges ? fc.constant(options.edges) : fc.constantFrom(...EDGES),
      group: fc.nat(),
    })
    .map((r) =>
      parseEffect({
        canvas: { width: r.width, height: r.height },
        pivot: options.centred
          ? { x: r.width / 2, y: r.height / 2 }
          : { x: (r.px % (2 * r.width + 1)) / 2, y: (r.py % (2 * r.height + 1)) / 2 },
        angles: { list: [r.angle] },
        fixedPoint: { bits: r.bits, fraction: r.fraction % r.bits },
        rounding: r.rounding,
        halfTurn: r.halfTurn,
        edges: r.edges,
        columnGroup: (r.group % r.width) + 1,
      }),
    );
}

/** Compiles the effect's first frame, or returns undefined when its shifts do not fit int32 (huge shears without a flip). */
export function firstFrame(e: Effect): FrameTables | undefined {
  try {
    return compileFrame(e, 0, angleTrack(e.angles)[0]);
  } catch (error) {
    if (error instanceof RangeError) return undefined;
    throw error;
  }
}
