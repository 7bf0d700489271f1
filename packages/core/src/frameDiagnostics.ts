import type { FrameShifts, RenderGeometry } from "./render.ts";

/** How far a frame's pixels land from the ideal turn, and how many crossed or left the canvas (spec §6). */
export interface FrameDiagnostics {
  /** Largest distance, in pixels, between a pixel's discrete and ideal centre, over pixels that stay inside. */
  readonly maxErrorPx: number;
  /** Mean of that distance in pixels over the same pixels; 0 when none stay inside. */
  readonly meanErrorPx: number;
  /** Pixels that crossed a canvas edge in any step (wrap mode). */
  readonly wrapped: number;
  /** Pixels dropped at an edge (clip mode). */
  readonly clipped: number;
}

/** The table as int32 values, the way the passes read it: shared when it already is an Int32Array. */
const int32Table = (t: ArrayLike<number>): Int32Array => (t instanceof Int32Array ? t : Int32Array.from(t));

/** 2^−53, the unit roundoff of a double: the largest relative error of one correctly rounded operation. */
const UNIT_ROUNDOFF = 2 ** -53;

/** Whether t[n − 1 − i] = −t[i] for every i: a table of a centred pivot with a symmetric rounding (spec §4). */
export function antisymmetric(t: ArrayLike<number>): boolean {
  for (let i = 0, j = t.length - 1; i <= j; i++, j--) if (t[j] !== -t[i]) return false;
  return true;
}

/** Whether a mask keeps pixel i exactly when it keeps pixel N − 1 − i: symmetric under the half turn about the canvas centre. */
export function pointSymmetric(mask: Uint8Array): boolean {
  for (let i = 0, j = mask.length - 1; i < j; i++, j--) if ((mask[i] === 0) !== (mask[j] === 0)) return false;
  return true;
}

/** The mask a measurement without one is given: never read, as `useMask` is false. */
const NO_MASK = new Uint8Array(0);

let scratchRowMax = new Float64Array(1);

/**
 * Follows every canvas pixel (or every pixel set in `mask`, one byte per canvas pixel) through flip, row, column and
 * row pass, and compares where it lands with the ideal rotation by `degrees` (θn) about the pivot (spec §6).
 */
export function frameDiagnostics(
  frame: FrameShifts & { readonly degrees: number },
  geometry: RenderGeometry,
  mask?: Uint8Array,
): FrameDiagnostics {
  const { width, height } = geometry.canvas;
  if (mask && mask.length !== width * height)
    throw new RangeError(`mask: ${mask.length} pixels, expected ${width}×${height} = ${width * height}`);
  return measureFrame(frame, geometry, mask, mask === undefined || pointSymmetric(mask));
}

/**
 * frameDiagnostics with the mask's point symmetry already known (a track checks it once, not once per frame).
 *
 * Hot loop. Positions are half-pixel integers; the ideal position advances by a constant step along a row, one addition
 * per column exactly as before, so every distance is the same double it always was. Structure is used where it is exact:
 * - The flip and the first row pass move a whole row alike, so the columns that stay inside through them are one range
 *   per row; only those go through the per-pixel column and second row steps.
 * - With a centred pivot, antisymmetric tables (a symmetric rounding, spec §4) and a mask symmetric about the centre,
 *   the half turn about the centre maps the passes onto themselves: pixel (W−1−c, H−1−r) lands exactly opposite (c, r),
 *   inside exactly when it is, at the same distance from its ideal position. The top half of the rows is measured and
 *   counted twice. Only the sum's order and its last bits change: the mean moves by well under 1e-9 px
 *   (docs/shear-core.md §6). The maximum stays the exact double it was: a bottom-half distance can differ from its
 *   mirror's only by rounding (bounded below), so any bottom row that might hold a larger one is measured too.
 * Runs of equal column shifts along a row were tried as well (each run split once into the pixels that stay and those
 * that leave, no table read inside a run): slower at every angle measured, even at ±4° (bench/diagnostics.bench.ts),
 * because the square root per pixel binds and every run's end costs mispredicted branches; the table reads ride free.
 */
export function measureFrame(
  frame: FrameShifts & { readonly degrees: number },
  geometry: RenderGeometry,
  mask: Uint8Array | undefined,
  maskSymmetric: boolean,
): FrameDiagnostics {
  const W = geometry.canvas.width;
  const H = geometry.canvas.height;
  const p2x = Math.round(geometry.pivot.x * 2);
  const p2y = Math.round(geometry.pivot.y * 2);
  const clip = geometry.edges === "clip";
  const h = int32Table(frame.h);
  const v = int32Table(frame.v);
  const flip = frame.flip;
  const theta = (frame.degrees * Math.PI) / 180;
  const cos = Math.cos(theta);
  const sin = Math.sin(theta);
  const useMask = mask !== undefined;
  const m8 = mask ?? NO_MASK;
  const rows = (from: number, to: number, totals: Float64Array, rowMax: Float64Array) =>
    measureRows(W, H, p2x, p2y, flip, h, v, cos, sin, useMask, m8, from, to, totals, rowMax);

  // [sum of distances (half-pixels), pixels measured, pixels out]
  const totals = new Float64Array(3);
  const symmetric = p2x === W && p2y === H && maskSymmetric && antisymmetric(h) && antisymmetric(v);
  const half = symmetric ? H >> 1 : H;
  if (scratchRowMax.length < half) scratchRowMax = new Float64Array(half);
  const rowMax = scratchRowMax;
  let max2 = rows(0, half, totals, rowMax);
  if (symmetric) {
    totals[0] *= 2;
    totals[1] *= 2;
    totals[2] *= 2;
    // An odd middle row is its own mirror: measured whole, once.
    const one = new Float64Array(1);
    if (H % 2 === 1) max2 = Math.max(max2, rows(half, half + 1, totals, one));
    // A bottom-half distance differs from its mirror's only by rounding: the ideal position after c additions is off
    // by at most (c + 2)·u·B (u the unit roundoff, B = 2(W + H) ≥ |x|, |y| in half-pixels), and so is each
    // component of the error, which squares and adds with three more roundings. Rows whose top-half maximum comes
    // within twice that bound (with a margin of two) of the frame's maximum are measured in the bottom half as well,
    // for their maximum only.
    const dx = (W + 3) * 2 * (W + H) * UNIT_ROUNDOFF * 2;
    const s = Math.sqrt(max2) + 1;
    const d1 = dx + UNIT_ROUNDOFF * s;
    const bound = 4 * s * d1 + 2 * d1 * d1 + 4 * UNIT_ROUNDOFF * s * s;
    const threshold = max2 - 4 * bound;
    const ignored = new Float64Array(3);
    for (let r = 0; r < half; r++) if (rowMax[r] >= threshold) max2 = Math.max(max2, rows(H - 1 - r, H - r, ignored, one));
  }
  const out = totals[2];
  const inside = totals[1];
  return {
    maxErrorPx: Math.sqrt(max2) / 2,
    meanErrorPx: inside === 0 ? 0 : totals[0] / inside / 2,
    wrapped: clip ? 0 : out,
    clipped: clip ? out : 0,
  };
}

/**
 * Measures rows [from, to): adds their distances, pixels measured and pixels out to `totals`, stores each row's largest
 * squared distance (half-pixels squared) in `rowMax[r − from]`, and returns the largest. Hot loop: one function with
 * plain parameters for all the rows, called the same way every time, so that the loop compiles to one stable shape
 * (a variant that read them from an object, or took flags for other uses, ran up to 1.5 times slower, unpredictably).
 */
function measureRows(
  W: number,
  H: number,
  p2x: number,
  p2y: number,
  flip: boolean,
  h: Int32Array,
  v: Int32Array,
  cos: number,
  sin: number,
  useMask: boolean,
  m8: Uint8Array,
  from: number,
  to: number,
  totals: Float64Array,
  rowMax: Float64Array,
): number {
  const stepX = 2 * cos;
  const stepY = 2 * sin;
  const u0 = 1 - p2x;
  const dc = flip ? -1 : 1;
  let out = 0;
  let inside = 0;
  let sum = totals[0];
  let max2 = 0;
  for (let r = from, m = from * W; r < to; r++, m += W) {
    rowMax[r - from] = 0;
    const rf = flip ? p2y - 1 - r : r;
    // Columns c in [lo, hi) stay inside through the flip and the first row pass; the rest of the row crossed an edge.
    let lo = 0;
    let hi = 0;
    let k = 0;
    if (rf >= 0 && rf < H) {
      const hr = h[rf];
      if (flip) {
        // cf = P2x−1−c and c1 = cf + h both in [0, W).
        k = p2x - 1 + hr;
        lo = Math.max(0, p2x - W, k - W + 1);
        hi = Math.min(W, p2x, k + 1);
      } else {
        k = hr;
        lo = Math.max(0, -hr);
        hi = Math.min(W, W - hr);
      }
      if (hi <= lo) lo = hi = 0;
    }
    if (useMask) {
      for (let c = 0; c < lo; c++) if (m8[m + c] !== 0) out++;
      for (let c = hi; c < W; c++) if (m8[m + c] !== 0) out++;
    } else out += W - (hi - lo);
    if (lo === hi) continue;

    const vr = 2 * r + 1 - p2y;
    let x = u0 * cos - vr * sin; // ideal position of the pixel, half-pixels from the pivot
    let y = u0 * sin + vr * cos;
    // The ideal position is advanced one column at a time, exactly as many additions as the columns before lo.
    for (let c = 0; c < lo; c++) {
      x += stepX;
      y += stepY;
    }
    let c1 = flip ? k - lo : k + lo;
    let row2 = 0;
    // The same steps with and without a mask, so that the loop without one carries no test for it.
    if (useMask) {
      for (let c = lo; c < hi; c++, c1 += dc, x += stepX, y += stepY) {
        if (m8[m + c] === 0) continue;
        const r2 = rf + v[c1];
        if (r2 >>> 0 >= H) {
          out++;
          continue;
        }
        const c3 = c1 + h[r2];
        if (c3 >>> 0 >= W) {
          out++;
          continue;
        }
        const ex = 2 * c3 + 1 - p2x - x;
        const ey = 2 * r2 + 1 - p2y - y;
        const e2 = ex * ex + ey * ey;
        sum += Math.sqrt(e2);
        if (e2 > row2) row2 = e2;
        inside++;
      }
    } else {
      for (let c = lo; c < hi; c++, c1 += dc, x += stepX, y += stepY) {
        const r2 = rf + v[c1];
        if (r2 >>> 0 >= H) {
          out++;
          continue;
        }
        const c3 = c1 + h[r2];
        if (c3 >>> 0 >= W) {
          out++;
          continue;
        }
        const ex = 2 * c3 + 1 - p2x - x;
        const ey = 2 * r2 + 1 - p2y - y;
        const e2 = ex * ex + ey * ey;
        sum += Math.sqrt(e2);
        if (e2 > row2) row2 = e2;
        inside++;
      }
    }
    rowMax[r - from] = row2;
    if (row2 > max2) max2 = row2;
  }
  totals[0] = sum;
  totals[1] += inside;
  totals[2] += out;
  return max2;
}
