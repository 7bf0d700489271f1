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
  const alpha = fit(-Math.tan(radians / 2));
  const beta = fit(Math.sin(radians));
  return { alpha, beta, saturated };
}
