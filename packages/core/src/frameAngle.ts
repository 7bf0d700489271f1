import type { HalfTurn } from "./limits.ts";

/** An angle in degrees reduced into (−180, 180]; −180 becomes 180 (spec §2). */
export function normalizeDegrees(degrees: number): number {
  if (!Number.isFinite(degrees)) throw new RangeError(`degrees: ${degrees} is not allowed; allowed a finite number`);
  let d = degrees % 360;
  if (d > 180) d -= 360;
  else if (d <= -180) d += 360;
  return d === 0 ? 0 : d; // no negative zero in the tables
}

/** How one frame turns: θn in degrees, the residual θr the shears do, and whether a half-turn flip comes first (spec §2). */
export interface FrameAngle {
  readonly degrees: number;
  readonly residualDegrees: number;
  readonly flip: boolean;
}

/** Splits a frame's angle (degrees) into an optional free half-turn flip and the residual turn the shears do (spec §2). */
export function frameAngle(degrees: number, halfTurn: HalfTurn): FrameAngle {
  const n = normalizeDegrees(degrees);
  if (halfTurn === "flip" && Math.abs(n) > 90) return { degrees: n, residualDegrees: n > 0 ? n - 180 : n + 180, flip: true };
  return { degrees: n, residualDegrees: n, flip: false };
}
