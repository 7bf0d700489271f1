// The implementation as it was before issue 10's speed-ups, kept unchanged as the benchmarks' baseline: every speed-up
// is measured against it in the same run. Not used by the product; do not edit (bench/README.md).
import type { FrameShifts, RenderGeometry } from "../../src/render.ts";

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

const NO_MASK = new Uint8Array(0);

/** The table as int32 values, the way the passes read it: shared when it already is an Int32Array. */
const int32Table = (t: ArrayLike<number>): Int32Array => (t instanceof Int32Array ? t : Int32Array.from(t));

/**
 * Follows every canvas pixel (or every pixel set in `mask`, one byte per canvas pixel) through flip, row, column and
 * row pass, and compares where it lands with the ideal rotation by `degrees` (θn) about the pivot (spec §6).
 *
 * Hot loop: positions are kept in half-pixel integers and the ideal position advances by a constant step along a row.
 * The flip and first row pass move a whole row alike, so the columns that stay inside through them form one range,
 * found per row; only those pixels go through the per-pixel column and second row steps.
 */
export function frameDiagnostics(
  frame: FrameShifts & { readonly degrees: number },
  geometry: RenderGeometry,
  mask?: Uint8Array,
): FrameDiagnostics {
  const W = geometry.canvas.width;
  const H = geometry.canvas.height;
  if (mask && mask.length !== W * H) throw new RangeError(`mask: ${mask.length} pixels, expected ${W}×${H} = ${W * H}`);
  const p2x = Math.round(geometry.pivot.x * 2);
  const p2y = Math.round(geometry.pivot.y * 2);
  const clip = geometry.edges === "clip";
  const flip = frame.flip;
  const h = int32Table(frame.h);
  const v = int32Table(frame.v);
  const theta = (frame.degrees * Math.PI) / 180;
  const cos = Math.cos(theta);
  const sin = Math.sin(theta);
  const stepX = 2 * cos;
  const stepY = 2 * sin;
  const u0 = 1 - p2x;
  const useMask = mask !== undefined;
  const m8 = mask ?? NO_MASK;

  let out = 0;
  let inside = 0;
  let sum = 0;
  let max2 = 0;

  for (let r = 0, m = 0; r < H; r++, m += W) {
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
    const dc = flip ? -1 : 1;
    let c1 = flip ? k - lo : k + lo;
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
        if (e2 > max2) max2 = e2;
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
        if (e2 > max2) max2 = e2;
        inside++;
      }
    }
  }
  return {
    maxErrorPx: Math.sqrt(max2) / 2,
    meanErrorPx: inside === 0 ? 0 : sum / inside / 2,
    wrapped: clip ? 0 : out,
    clipped: clip ? out : 0,
  };
}
