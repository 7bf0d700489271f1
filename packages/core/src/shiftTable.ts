import type { Rounding } from "./limits.ts";
import { shift } from "./shift.ts";

/** How shifts are rounded: the coefficient's fraction bits and the rounding rule (spec §4). */
export interface ShiftRule {
  readonly fraction: number;
  readonly rounding: Rounding;
}

/** The row table h: h[r] = s(kα, 2r + 1 − P2y) for every canvas row, in whole pixels (spec §4). */
export function rowShifts(alpha: number, height: number, pivotY2: number, rule: ShiftRule): Int32Array {
  const h = new Int32Array(height);
  for (let r = 0; r < height; r++) h[r] = shift(alpha, 2 * r + 1 - pivotY2, rule.fraction, rule.rounding);
  return h;
}

/**
 * The column table v: every column of a group of `group` columns takes the shift at the group's nominal centre,
 * v[c] = s(kβ, 2·⌊c/g⌋·g + g − P2x), in whole pixels (spec §4).
 */
export function columnShifts(beta: number, width: number, pivotX2: number, group: number, rule: ShiftRule): Int32Array {
  const v = new Int32Array(width);
  for (let start = 0; start < width; start += group) {
    const s = shift(beta, 2 * start + group - pivotX2, rule.fraction, rule.rounding);
    v.fill(s, start, Math.min(width, start + group));
  }
  return v;
}
