/** Growing the canvas to core's canvas-fit advice without cutting anything: only the sides that must grow, grow. */
import type { CanvasFit, Effect } from "@skewsmith/core";

export interface Growth {
  width: number;
  height: number;
  left: number;
  top: number;
  right: number;
  bottom: number;
  pivot: { x: number; y: number };
}

/**
 * The canvas that holds every frame and all of the current one: core's fit with the sides it would trim kept as they
 * are, the size rounded up to `align` on the right and bottom. The left side grows by whole column groups (core's
 * fit already gives that), so every column keeps its group's shift.
 */
export function growToFit(effect: Effect, fit: CanvasFit, align = 1): Growth {
  const left = Math.max(0, fit.change.left);
  const top = Math.max(0, fit.change.top);
  let right = Math.max(0, fit.change.right);
  let bottom = Math.max(0, fit.change.bottom);
  const w = effect.canvas.width + left + right;
  const h = effect.canvas.height + top + bottom;
  right += (align - (w % align)) % align;
  bottom += (align - (h % align)) % align;
  return {
    width: effect.canvas.width + left + right,
    height: effect.canvas.height + top + bottom,
    left,
    top,
    right,
    bottom,
    pivot: { x: effect.pivot.x + left, y: effect.pivot.y + top },
  };
}
