import type { Bits } from "./limits.ts";

/** Rounds half away from zero; never returns negative zero. */
export function roundHalfAway(x: number): number {
  const r = Math.sign(x) * Math.round(Math.abs(x));
  return r === 0 ? 0 : r;
}

/** The signed integer range of a `bits`-wide two's complement value. */
export function signedRange(bits: number): { min: number; max: number } {
  return { min: -(2 ** (bits - 1)), max: 2 ** (bits - 1) - 1 };
}

/**
 * sin of an angle in degrees, exact where the true value is rational. For a rational number of degrees the only
 * rational sines are 0, ±1/2 and ±1 (Niven's theorem), at multiples of 30°; Math.sin(π/6) is 0.49999999999999994,
 * which would turn the exact tie nearest(1/2) (fraction 0) into 0 instead of 1. Elsewhere no tie can occur.
 */
function sinDegrees(degrees: number): number {
  if (degrees % 30 === 0) {
    const turn = (((degrees % 360) + 360) % 360) / 30; // 0 … 11
    const exact = [0, 0.5, undefined, 1, undefined, 0.5, 0, -0.5, undefined, -1, undefined, -0.5][turn];
    if (exact !== undefined) return exact;
  }
  return Math.sin((degrees * Math.PI) / 180);
}

/** The fixed-point shear coefficients of one frame: kα, kβ (integers scaled by 2^fraction) and whether either was clamped (spec §3). */
export interface Coefficients {
  readonly alpha: number;
  readonly beta: number;
  readonly saturated: boolean;
}

/** kα = sat(nearest(−tan(θr/2)·2^F)) and kβ = sat(nearest(sin θr·2^F)) for a residual angle in degrees (spec §3). */
export function coefficients(residualDegrees: number, fixedPoint: { readonly bits: Bits; readonly fraction: number }): Coefficients {
  const { bits, fraction } = fixedPoint;
  const radians = (residualDegrees * Math.PI) / 180;
  const scale = 2 ** fraction;
  const { min, max } = signedRange(bits);
  let saturated = false;
  const fit = (x: number) => {
    const k = roundHalfAway(x * scale);
    if (k < min || k > max || !Number.isFinite(k)) {
      saturated = true;
      return k < 0 ? min : max;
    }
    return k;
  };
  // tan(θr/2) is rational only where it is 0 or ±1 and never lands on a tie after scaling, so Math.tan needs no help.
  const alpha = fit(-Math.tan(radians / 2));
  const beta = fit(sinDegrees(residualDegrees));
  return { alpha, beta, saturated };
}
