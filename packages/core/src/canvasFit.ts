import { angleTrack } from "./angleTrack.ts";
import { coefficients } from "./coefficients.ts";
import { LIMITS } from "./limits.ts";
import type { Effect } from "./effect.ts";
import { frameAngle } from "./frameAngle.ts";
import { shift } from "./shift.ts";

/** Pixels to add (positive) or remove (negative) on each side of a canvas. */
export interface Sides {
  readonly left: number;
  readonly right: number;
  readonly top: number;
  readonly bottom: number;
}

/** The smallest canvas on which no pixel of the content wraps or clips in any step of any frame. */
export interface CanvasFit {
  /** True when the current canvas already holds every step of every frame. */
  readonly fitsNow: boolean;
  /** Smallest canvas width and height in pixels (rounded up to `align`). */
  readonly width: number;
  readonly height: number;
  /** True when that canvas is within the allowed 1 … 4096 pixels per side. */
  readonly withinLimits: boolean;
  /** How the current canvas changes on each side, in pixels: positive grows, negative trims. */
  readonly change: Sides;
  /** The pivot on the new canvas, in pixels (pixel-edge coordinates). */
  readonly pivot: { readonly x: number; readonly y: number };
  /** The content's bounding box on the current canvas (the mask's set pixels, or the whole canvas). */
  readonly content: { readonly x: number; readonly y: number; readonly width: number; readonly height: number };
  /** Free pixels around the content on the new canvas. */
  readonly margin: Sides;
  /** The frame that reaches furthest outside the current canvas (−1 when it fits). */
  readonly worstFrame: number;
}

/** Options of canvasFit. */
export interface CanvasFitOptions {
  /** Content pixels (one byte per canvas pixel, non-zero = content), say a sprite's opaque pixels; default the whole canvas. */
  readonly mask?: Uint8Array;
  /** Round the new width and height up to a multiple of this many pixels (say 8 for tile-based hardware); default 1. */
  readonly align?: number;
}

/** Longest range an OpenTable stores; beyond it (huge shifts without a flip) each entry is computed when asked for. */
const TABULATE_MAX = 1 << 20;

/**
 * A shift table over any integer range of rows or columns, not only the canvas's own. A shift s(k, t) is monotonic in
 * t for every rounding rule, so the table's extremes lie at its two ends.
 */
class OpenTable {
  // Float64Array, not Int32Array: a shift beyond int32 must not wrap here (it makes the canvas too large, not wrong).
  private readonly values: Float64Array | undefined;
  constructor(
    readonly lo: number,
    readonly hi: number,
    private readonly at: (i: number) => number,
  ) {
    if (hi - lo + 1 <= TABULATE_MAX) {
      this.values = new Float64Array(hi - lo + 1);
      for (let i = lo; i <= hi; i++) this.values[i - lo] = at(i);
    }
  }
  get(i: number): number {
    return this.values ? this.values[i - this.lo] : this.at(i);
  }
  range(): [number, number] {
    const a = this.get(this.lo);
    const b = this.get(this.hi);
    return [Math.min(0, a, b), Math.max(0, a, b)];
  }
}

/**
 * Follows every content pixel through every frame on an unbounded plane and returns the smallest canvas that holds
 * all of its positions (spec §5, §6): on that canvas nothing wraps or clips, and the shift tables of the content are
 * unchanged because shifts depend only on positions relative to the pivot (left growth stays a multiple of the
 * column group so groups keep their place).
 */
export function canvasFit(effect: Effect, options: CanvasFitOptions = {}): CanvasFit {
  const { width: W, height: H } = effect.canvas;
  const { mask } = options;
  const align = options.align ?? 1;
  if (!Number.isInteger(align) || align < 1 || align > LIMITS.canvas.max)
    throw new RangeError(`align: ${align} is not allowed; allowed a whole number from 1 to ${LIMITS.canvas.max}`);
  if (mask && mask.length !== W * H) throw new RangeError(`mask: ${mask.length} pixels, expected ${W}×${H} = ${W * H}`);
  const p2x = effect.pivot.x * 2;
  const p2y = effect.pivot.y * 2;
  const g = effect.columnGroup;
  const { fraction } = effect.fixedPoint;
  const { rounding } = effect;

  let r0 = H;
  let r1 = -1;
  let c0 = W;
  let c1 = -1;
  for (let r = 0; r < H; r++)
    for (let c = 0; c < W; c++)
      if (!mask || mask[r * W + c]) {
        if (r < r0) r0 = r;
        if (r > r1) r1 = r;
        if (c < c0) c0 = c;
        if (c > c1) c1 = c;
      }
  const empty = r1 < 0;
  // The pivot stays on the canvas: count its neighbouring pixels as reached.
  let minX = Math.min(empty ? Infinity : c0, Math.ceil(p2x / 2) - 1);
  let maxX = Math.max(empty ? -Infinity : c1, Math.floor(p2x / 2));
  let minY = Math.min(empty ? Infinity : r0, Math.ceil(p2y / 2) - 1);
  let maxY = Math.max(empty ? -Infinity : r1, Math.floor(p2y / 2));
  minX = Math.max(minX, 0);
  maxX = Math.min(maxX, W - 1);
  minY = Math.max(minY, 0);
  maxY = Math.min(maxY, H - 1);

  let worstFrame = -1;
  let worstReach = 0;
  if (!empty) {
    angleTrack(effect.angles).forEach((degrees, index) => {
      const angle = frameAngle(degrees, effect.halfTurn);
      const { alpha, beta } = coefficients(angle.residualDegrees, effect.fixedPoint);
      const flip = angle.flip;
      const rowsLo = flip ? p2y - 1 - r1 : r0;
      const rowsHi = flip ? p2y - 1 - r0 : r1;
      const colsLo = flip ? p2x - 1 - c1 : c0;
      const colsHi = flip ? p2x - 1 - c0 : c1;
      const hAt = (r: number) => shift(alpha, 2 * r + 1 - p2y, fraction, rounding);
      const vAt = (c: number) => shift(beta, 2 * Math.floor(c / g) * g + g - p2x, fraction, rounding);
      const h1 = new OpenTable(rowsLo, rowsHi, hAt);
      const [h1min, h1max] = h1.range();
      const v = new OpenTable(colsLo + h1min, colsHi + h1max, vAt);
      const [vmin, vmax] = v.range();
      const h3 = new OpenTable(rowsLo + vmin, rowsHi + vmax, hAt);
      let fx0 = Infinity;
      let fx1 = -Infinity;
      let fy0 = Infinity;
      let fy1 = -Infinity;
      for (let r = r0; r <= r1; r++) {
        const rf = flip ? p2y - 1 - r : r;
        const hr = h1.get(rf);
        for (let c = c0; c <= c1; c++) {
          if (mask && !mask[r * W + c]) continue;
          const cf = flip ? p2x - 1 - c : c;
          const x1 = cf + hr;
          const r2 = rf + v.get(x1);
          const x3 = x1 + h3.get(r2);
          fx0 = Math.min(fx0, cf, x1, x3);
          fx1 = Math.max(fx1, cf, x1, x3);
          fy0 = Math.min(fy0, rf, r2);
          fy1 = Math.max(fy1, rf, r2);
        }
      }
      const reach = Math.max(0, -fx0) + Math.max(0, fx1 - (W - 1)) + Math.max(0, -fy0) + Math.max(0, fy1 - (H - 1));
      if (reach > worstReach) {
        worstReach = reach;
        worstFrame = index;
      }
      minX = Math.min(minX, fx0);
      maxX = Math.max(maxX, fx1);
      minY = Math.min(minY, fy0);
      maxY = Math.max(maxY, fy1);
    });
  }
  const fitsNow = worstReach === 0;
  // Grow or trim the left side by whole column groups so every column keeps its group's shift.
  const left = Math.ceil(-minX / g) * g || 0; // never −0
  const top = -minY || 0;
  let right = maxX - (W - 1);
  let bottom = maxY - (H - 1);
  let width = W + left + right;
  let height = H + top + bottom;
  const padX = (align - (width % align)) % align;
  const padY = (align - (height % align)) % align;
  right += padX;
  bottom += padY;
  width += padX;
  height += padY;
  const content = empty ? { x: 0, y: 0, width: 0, height: 0 } : { x: c0, y: r0, width: c1 - c0 + 1, height: r1 - r0 + 1 };
  return {
    fitsNow,
    width,
    height,
    withinLimits: width <= LIMITS.canvas.max && height <= LIMITS.canvas.max,
    change: { left, right, top, bottom },
    pivot: { x: effect.pivot.x + left, y: effect.pivot.y + top },
    content,
    margin: empty
      ? { left: 0, right: 0, top: 0, bottom: 0 }
      : { left: c0 + left, right: width - (c1 + left) - 1, top: r0 + top, bottom: height - (r1 + top) - 1 },
    worstFrame,
  };
}
