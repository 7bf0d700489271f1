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

/**
 * Follows every canvas pixel (or every pixel set in `mask`, one byte per canvas pixel) through flip, row, column and
 * row pass, and compares where it lands with the ideal rotation by `degrees` (θn) about the pivot (spec §6).
 *
 * Hot loop: positions are kept in half-pixel integers and the ideal position advances by a constant step along a row.
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
  const h = Int32Array.from(frame.h);
  const v = Int32Array.from(frame.v);
  const theta = (frame.degrees * Math.PI) / 180;
  const cos = Math.cos(theta);
  const sin = Math.sin(theta);
  const stepX = 2 * cos;
  const stepY = 2 * sin;
  const u0 = 1 - p2x;

  let wrapped = 0;
  let clipped = 0;
  let inside = 0;
  let sum = 0;
  let max2 = 0;

  for (let r = 0; r < H; r++) {
    const vr = 2 * r + 1 - p2y;
    let rf = flip ? p2y - 1 - r : r;
    const rowOut = rf < 0 || rf >= H;
    if (rowOut) rf = ((rf % H) + H) % H;
    const hr = h[rf];
    let x = u0 * cos - vr * sin; // ideal position of the pixel, half-pixels from the pivot
    let y = u0 * sin + vr * cos;
    const m = r * W;
    for (let c = 0; c < W; c++, x += stepX, y += stepY) {
      if (mask !== undefined && mask[m + c] === 0) continue;
      let out = rowOut;
      let c1 = (flip ? p2x - 1 - c : c);
      if (c1 < 0 || c1 >= W) {
        out = true;
        c1 = ((c1 % W) + W) % W;
      }
      c1 += hr;
      if (c1 < 0 || c1 >= W) {
        out = true;
        c1 = ((c1 % W) + W) % W;
      }
      let r2 = rf + v[c1];
      if (r2 < 0 || r2 >= H) {
        out = true;
        r2 = ((r2 % H) + H) % H;
      }
      const c3 = c1 + h[r2];
      if (c3 < 0 || c3 >= W) out = true;
      if (out) {
        if (clip) clipped++;
        else wrapped++;
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
  return {
    maxErrorPx: Math.sqrt(max2) / 2,
    meanErrorPx: inside === 0 ? 0 : sum / inside / 2,
    wrapped,
    clipped,
  };
}
