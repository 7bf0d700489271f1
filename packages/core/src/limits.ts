/**
 * Allowed ranges of an effect document, from the core contract (shared/spec/shear-core.md §1, §2, §7).
 * Every validator and every error message reads its numbers from here.
 */
export const LIMITS = {
  /** Canvas width and height in pixels (spec §1). */
  canvas: { min: 1, max: 4096 },
  /** Frames in an angle track, list or sweep (spec §2). */
  frames: { min: 1, max: 4096 },
  /** Total bits of a fixed-point coefficient (spec §3). */
  bits: [8, 16, 32] as const,
  /** Pivot coordinates are multiples of this many pixels (spec §1). */
  pivotStep: 0.5,
} as const;

/** Rounding rules of a shift, spec §4. */
export const ROUNDINGS = ["nearest-away", "nearest-up", "floor", "trunc"] as const;
/** Half-turn rules, spec §2. */
export const HALF_TURNS = ["flip", "shear"] as const;
/** Edge rules, spec §5. */
export const EDGES = ["wrap", "clip"] as const;
/** Easing curves of a sweep, spec §2. */
export const EASINGS = ["linear", "ease-in-out"] as const;

export type Rounding = (typeof ROUNDINGS)[number];
export type HalfTurn = (typeof HALF_TURNS)[number];
export type Edges = (typeof EDGES)[number];
export type Easing = (typeof EASINGS)[number];
export type Bits = (typeof LIMITS.bits)[number];
