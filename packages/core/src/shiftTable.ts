import { ELEMENT_RANGES } from "./elementType.ts";
import type { Rounding } from "./limits.ts";

/** How shifts are rounded: the coefficient's fraction bits and the rounding rule (spec §4). */
export interface ShiftRule {
  readonly fraction: number;
  readonly rounding: Rounding;
}

/**
 * A shift checked against int32, the widest element type (spec §4). Without halfTurn "flip" and with few fraction bits a
 * saturated 32-bit coefficient can ask for more; an Int32Array would silently wrap it into a wrong table.
 */
function int32(s: number, table: "h" | "v", i: number): number {
  const { min, max } = ELEMENT_RANGES.int32;
  if (s < min || s > max)
    throw new RangeError(
      `shift tables: ${table}[${i}] = ${s} does not fit int32 (allowed ${min} to ${max}); use more fraction bits or halfTurn "flip"`,
    );
  return s;
}

/**
 * out[i] = s(k, t0 + 2i·step) for every i: the arithmetic of `shift` (shift.ts), with its divisor and rounding rule chosen once per
 * table instead of once per entry (hot loop: 4096 frames of 4096 rows and columns). `step` is also the spacing of the
 * canvas lines the entries stand for, so an error names the right row or column.
 */
function shiftsInto(out: Int32Array, k: number, t0: number, step: number, rule: ShiftRule, table: "h" | "v"): void {
  const d = 2 ** (rule.fraction + 1);
  const half = d / 2;
  const dt = 2 * step;
  const n = out.length;
  // Same expressions as shift(): k·t and the sums below are exact (|k·t| < 2^45), and d is a power of two.
  switch (rule.rounding) {
    case "nearest-away":
      for (let i = 0, t = t0; i < n; i++, t += dt) {
        const x = k * t;
        out[i] = int32(x < 0 ? -Math.floor((-x + half) / d) : Math.floor((x + half) / d), table, i * step);
      }
      break;
    case "nearest-up":
      for (let i = 0, t = t0; i < n; i++, t += dt) out[i] = int32(Math.floor((k * t + half) / d), table, i * step);
      break;
    case "floor":
      for (let i = 0, t = t0; i < n; i++, t += dt) out[i] = int32(Math.floor((k * t) / d), table, i * step);
      break;
    case "trunc":
      for (let i = 0, t = t0; i < n; i++, t += dt) out[i] = int32(Math.trunc((k * t) / d), table, i * step);
      break;
  }
}

/** The row table h: h[r] = s(kα, 2r + 1 − P2y) for every canvas row, in whole pixels (spec §4). */
export function rowShifts(alpha: number, height: number, pivotY2: number, rule: ShiftRule): Int32Array {
  const h = new Int32Array(height);
  rowShiftsInto(h, alpha, pivotY2, rule);
  return h;
}

/** rowShifts written into `h`, one entry per canvas row (h.length rows), for callers that pack many tables into one buffer. */
export function rowShiftsInto(h: Int32Array, alpha: number, pivotY2: number, rule: ShiftRule): void {
  shiftsInto(h, alpha, 1 - pivotY2, 1, rule, "h");
}

/**
 * The column table v: every column of a group of `group` columns takes the shift at the group's nominal centre,
 * v[c] = s(kβ, 2·⌊c/g⌋·g + g − P2x), in whole pixels (spec §4).
 */
export function columnShifts(beta: number, width: number, pivotX2: number, group: number, rule: ShiftRule): Int32Array {
  const v = new Int32Array(width);
  columnShiftsInto(v, beta, pivotX2, group, rule);
  return v;
}

/** columnShifts written into `v`, one entry per canvas column (v.length columns), for callers that pack many tables into one buffer. */
export function columnShiftsInto(v: Int32Array, beta: number, pivotX2: number, group: number, rule: ShiftRule): void {
  const width = v.length;
  if (group === 1) {
    shiftsInto(v, beta, 1 - pivotX2, 1, rule, "v");
    return;
  }
  // One shift per group into the front of v, then spread from the back: v[⌊c/g⌋] is never overwritten before it is read.
  shiftsInto(v.subarray(0, Math.ceil(width / group)), beta, group - pivotX2, group, rule, "v");
  for (let c = width - 1; c >= 0; c--) v[c] = v[Math.floor(c / group)];
}
