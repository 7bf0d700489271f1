import type { Rounding } from "./limits.ts";

/**
 * s(k, t) = R(k·t / 2^(F+1)): the whole-pixel shift of a relative coordinate t (half-pixels) by a coefficient k
 * scaled by 2^F (spec §4).
 *
 * Exact: |k·t| < 2^45 and the divisor is a power of two, so every double below is an integer or an exact
 * binary fraction; no rounding error can occur before R is applied.
 */
export function shift(k: number, t: number, fraction: number, rounding: Rounding): number {
  const n = k * t;
  const d = 2 ** (fraction + 1);
  let s: number;
  switch (rounding) {
    case "nearest-away":
      s = n < 0 ? -Math.floor((-n + d / 2) / d) : Math.floor((n + d / 2) / d);
      break;
    case "nearest-up":
      s = Math.floor((n + d / 2) / d);
      break;
    case "floor":
      s = Math.floor(n / d);
      break;
    case "trunc":
      s = Math.trunc(n / d);
      break;
  }
  return s === 0 ? 0 : s;
}
