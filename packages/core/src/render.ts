import type { Edges } from "./limits.ts";

/** One element per pixel: palette indices (Uint8Array) or packed RGBA words (Uint32Array); 0 is the background. */
export type PixelData = Uint8Array | Uint16Array | Uint32Array;

/** A canvas-sized plane of pixels, row-major, `width` × `height` elements. */
export interface Plane<T extends PixelData = PixelData> {
  readonly width: number;
  readonly height: number;
  readonly data: T;
}

/** What a render needs of a frame: the half-turn flip and the row (h) and column (v) shift tables in whole pixels. */
export interface FrameShifts {
  readonly flip: boolean;
  readonly h: ArrayLike<number>;
  readonly v: ArrayLike<number>;
}

/** What a render needs of an effect: canvas size (pixels), pivot (pixels, multiple of 0.5) and the edge rule. */
export interface RenderGeometry {
  readonly canvas: { readonly width: number; readonly height: number };
  readonly pivot: { readonly x: number; readonly y: number };
  readonly edges: Edges;
}

/** Which pass a render stops after: 1 = flip and first row pass, 2 = column pass, 3 = second row pass (the frame). */
export type PassNumber = 1 | 2 | 3;

type Ctor<T extends PixelData> = { new (length: number): T };

const mod = (x: number, n: number) => ((x % n) + n) % n;

/** Below this many pixels a run is copied element by element: cheaper than making a subarray view for `set`. */
const SHORT_RUN = 24;

/**
 * Draws frames exactly as the target does (spec §5), reusing two scratch planes across calls.
 * Rows move as block copies; the column pass is a row-major gather over runs of columns that share a shift,
 * so no step walks a large image column by column.
 */
export class Renderer<T extends PixelData> {
  readonly width: number;
  readonly height: number;
  private readonly a: T;
  private readonly b: T;
  private readonly runStart: Int32Array;
  private readonly runEnd: Int32Array;
  private readonly runShift: Int32Array;

  /** Makes a renderer for `width` × `height` planes of the given element type (Uint8Array for indices, Uint32Array for RGBA). */
  constructor(width: number, height: number, type: Ctor<T>) {
    this.width = width;
    this.height = height;
    this.a = new type(width * height);
    this.b = new type(width * height);
    this.runStart = new Int32Array(width);
    this.runEnd = new Int32Array(width);
    this.runShift = new Int32Array(width);
  }

  /**
   * Renders `src` through the frame up to pass `pass` and returns one of the renderer's own planes:
   * valid until the next call, copy it to keep it.
   */
  render(src: T, frame: FrameShifts, geometry: RenderGeometry, pass: PassNumber = 3): T {
    const { width: W, height: H } = this;
    if (geometry.canvas.width !== W || geometry.canvas.height !== H)
      throw new RangeError(`canvas: ${geometry.canvas.width}×${geometry.canvas.height} does not match the renderer's ${W}×${H}`);
    if (src.length !== W * H) throw new RangeError(`source: ${src.length} pixels, expected ${W}×${H} = ${W * H}`);
    if (frame.h.length !== H || frame.v.length !== W)
      throw new RangeError(`frame: tables of ${frame.h.length} rows and ${frame.v.length} columns, expected ${H} and ${W}`);
    const clip = geometry.edges === "clip";
    const p2x = Math.round(geometry.pivot.x * 2);
    const p2y = Math.round(geometry.pivot.y * 2);
    if (frame.flip) this.flipRows(src, this.a, frame.h, p2x, p2y, clip);
    else this.rows(src, this.a, frame.h, clip);
    if (pass === 1) return this.a;
    this.columns(this.a, this.b, frame.v, clip);
    if (pass === 2) return this.b;
    this.rows(this.b, this.a, frame.h, clip);
    return this.a;
  }

  /** Row pass: dst[r][c + h[r]] = src[r][c], as one or two block copies per row. */
  private rows(src: T, dst: T, h: ArrayLike<number>, clip: boolean): void {
    const W = this.width;
    for (let r = 0, o = 0; r < this.height; r++, o += W) {
      const s = h[r];
      if (clip) {
        if (s >= W || s <= -W) {
          dst.fill(0, o, o + W);
        } else if (s >= 0) {
          dst.fill(0, o, o + s);
          dst.set(src.subarray(o, o + W - s), o + s);
        } else {
          dst.set(src.subarray(o - s, o + W), o);
          dst.fill(0, o + W + s, o + W);
        }
      } else {
        const k = mod(s, W);
        if (k === 0) dst.set(src.subarray(o, o + W), o);
        else {
          dst.set(src.subarray(o, o + W - k), o + k);
          dst.set(src.subarray(o + W - k, o + W), o);
        }
      }
    }
  }

  /** Half-turn flip and first row pass in one sweep: source row r lands reversed on row P2y−1−r, shifted by h there. */
  private flipRows(src: T, dst: T, h: ArrayLike<number>, p2x: number, p2y: number, clip: boolean): void {
    const W = this.width;
    const H = this.height;
    if (clip) dst.fill(0);
    for (let r = 0; r < H; r++) {
      let rf = p2y - 1 - r;
      if (rf < 0 || rf >= H) {
        if (clip) continue;
        rf = mod(rf, H);
      }
      // Column c goes to cf = P2x−1−c, then to c1 = cf + h[rf] = k − c.
      const k = p2x - 1 + h[rf];
      const so = r * W;
      const ro = rf * W;
      if (clip) {
        // Both cf and c1 must stay inside the canvas.
        const lo = Math.max(0, p2x - W, k - W + 1);
        const hi = Math.min(W - 1, p2x - 1, k);
        for (let c = lo; c <= hi; c++) dst[ro + k - c] = src[so + c];
      } else {
        let m = mod(k, W);
        for (let c = 0; c < W; c++) {
          dst[ro + m] = src[so + c];
          m = m === 0 ? W - 1 : m - 1;
        }
      }
    }
  }

  /** Column pass: dst[r][c] = src[r − v[c]][c], gathered row by row over runs of columns that share a shift. */
  private columns(src: T, dst: T, v: ArrayLike<number>, clip: boolean): void {
    const W = this.width;
    const H = this.height;
    const { runStart, runEnd, runShift } = this;
    let runs = 0;
    for (let c = 0; c < W; ) {
      const s = v[c];
      let e = c + 1;
      while (e < W && v[e] === s) e++;
      runStart[runs] = c;
      runEnd[runs] = e;
      runShift[runs] = clip ? s : mod(s, H);
      runs++;
      c = e;
    }
    for (let r = 0, o = 0; r < H; r++, o += W) {
      for (let i = 0; i < runs; i++) {
        const c0 = runStart[i];
        const c1 = runEnd[i];
        let sr = r - runShift[i];
        if (clip) {
          if (sr < 0 || sr >= H) {
            dst.fill(0, o + c0, o + c1);
            continue;
          }
        } else if (sr < 0) sr += H;
        const so = sr * W;
        if (c1 - c0 < SHORT_RUN) for (let c = c0; c < c1; c++) dst[o + c] = src[so + c];
        else dst.set(src.subarray(so + c0, so + c1), o + c0);
      }
    }
  }
}
