/**
 * One frame drawn up to a pass with what the preview's overlays need (wrapped and clipped pixels, the error against
 * the ideal turn, where the key pixels went) and the colour counts. No DOM and no React: the bench's Web Worker runs it.
 */
import type { CompiledTables, Effect, FrameTables } from "@skewsmith/core";
import { Renderers } from "./renderers.ts";
import type { BenchSource } from "./source.ts";
import type { Pass } from "./view.ts";

/** What the preview asks for besides the pixels. */
export interface FrameWants {
  /** Wrapped and clipped pixels. */
  readonly marks: boolean;
  /** The error of every pixel against the ideal turn (the finished frame only). */
  readonly error: boolean;
  /** Where the key pixels went. */
  readonly keys: boolean;
}

/** One frame as the preview draws it. */
export interface FramePicture {
  /** RGBA bytes, width × height × 4. */
  rgba: Uint8ClampedArray<ArrayBuffer>;
  /** Colour counts of this picture (see colourCounts). */
  colours: ColourCount[];
  /** Counted pixels (the sprite's opaque ones) that crossed an edge on the way to this pass, marked where they are now. */
  wrapped: Uint8Array<ArrayBuffer> | null;
  wrappedCount: number;
  /** Counted pixels lost at an edge (clip), as [x, y] of where the ideal turn would put their centres, in canvas pixels. */
  lost: Float32Array<ArrayBuffer> | null;
  lostCount: number;
  /** Per pixel, the distance in pixels from where the ideal turn puts the pixel now there; NaN where no counted pixel is. */
  error: Float32Array<ArrayBuffer> | null;
  maxErrorPx: number;
  /** Where each key pixel is now, as [x, y] pixel pairs; NaN when lost. */
  keys: Float32Array<ArrayBuffer> | null;
}

/** How many pixels of one colour a picture has: by palette index for an indexed picture, by packed RGBA otherwise. */
export interface ColourCount {
  key: number;
  /** The colour as CSS rgba(). */
  css: string;
  count: number;
  /** True for the background (index 0, or a fully transparent pixel). */
  background: boolean;
}

function css(packed: number): string {
  const r = packed & 255;
  const g = (packed >>> 8) & 255;
  const b = (packed >>> 16) & 255;
  const a = (packed >>> 24) & 255;
  return `rgba(${r}, ${g}, ${b}, ${(a / 255).toFixed(3).replace(/\.?0+$/, "") || "0"})`;
}

/** The colours of a plane and how often each occurs (palette order for indexed pictures, most frequent first otherwise). */
export function colourCounts(plane: Uint8Array | Uint32Array, colours: Uint32Array | null): ColourCount[] {
  if (colours) {
    const counts = new Uint32Array(colours.length);
    for (let i = 0; i < plane.length; i++) counts[plane[i]]++;
    return Array.from(colours, (c, i) => ({ key: i, css: css(c), count: counts[i], background: i === 0 }));
  }
  const counts = new Map<number, number>();
  for (let i = 0; i < plane.length; i++) {
    const v = plane[i] >>> 24 === 0 ? 0 : plane[i];
    counts.set(v, (counts.get(v) ?? 0) + 1);
  }
  return [...counts.entries()].sort((a, b) => b[1] - a[1]).map(([key, count]) => ({ key, css: css(key), count, background: key === 0 }));
}

/**
 * Draws frames of one effect and source, reusing planes between calls. Every pixel comes from core's Renderer; the
 * marks come from rendering a plane of pixel numbers the same way (with the edge rule swapped to clip, the pixels that
 * disappear are the ones that crossed an edge).
 */
export class FramePainter {
  private readonly renderers: Renderers;
  private identity: Uint32Array | null = null;
  readonly sourceColours: ColourCount[];

  constructor(
    readonly effect: Effect,
    readonly source: BenchSource,
    readonly tables: CompiledTables<FrameTables>,
  ) {
    this.renderers = new Renderers(effect.canvas.width, effect.canvas.height);
    this.sourceColours = colourCounts(source.plane, source.colours);
  }

  /** Pixel numbers plus one, so 0 stays "no pixel" (what clip leaves behind). */
  private ids(): Uint32Array {
    if (!this.identity) {
      const n = this.source.width * this.source.height;
      this.identity = new Uint32Array(n);
      for (let i = 0; i < n; i++) this.identity[i] = i + 1;
    }
    return this.identity;
  }

  /** Frame `index` up to `pass` (0 is the placed source), with what `wants` asks for; its RGBA in `into` when that fits. */
  paint(index: number, pass: Pass, wants: FrameWants, into?: ArrayBuffer): FramePicture {
    const { source, effect } = this;
    const frame = this.tables.frames[index];
    if (!frame) throw new RangeError(`frame: ${index} is not allowed; allowed 0 to ${this.tables.frames.length - 1}`);
    const plane = pass === 0 ? source.plane : this.renderers.for(source.plane).render(source.plane, frame, effect, pass);
    const bytes = source.width * source.height * 4;
    // Every pixel is written below, so a handed-back buffer needs no clearing.
    const rgba = into && into.byteLength === bytes ? new Uint8ClampedArray(into) : new Uint8ClampedArray(bytes);
    const out = new Uint32Array(rgba.buffer);
    if (source.colours) for (let i = 0; i < plane.length; i++) out[i] = source.colours[plane[i]];
    else out.set(plane);
    const picture: FramePicture = {
      rgba,
      colours: colourCounts(plane, source.colours),
      wrapped: null,
      wrappedCount: 0,
      lost: null,
      lostCount: 0,
      error: null,
      maxErrorPx: 0,
      keys: null,
    };
    if (pass === 0) {
      if (wants.keys && source.keys.length > 0) picture.keys = Float32Array.from(source.keys.flat());
      return picture;
    }
    if (!wants.marks && !wants.error && !wants.keys) return picture;

    const ids = this.ids();
    const W = source.width;
    const n = W * source.height;
    const landed = Uint32Array.from(this.renderers.for(ids).render(ids, frame, effect, pass));
    const mask = source.mask;
    const counted = (s: number) => mask === null || mask[s] !== 0;
    // Pixels that reach this pass without crossing an edge: those that survive the same passes with clip.
    const stayed = new Uint8Array(n);
    const clipped = effect.edges === "clip" ? landed : this.renderers.for(ids).render(ids, frame, { ...effect, edges: "clip" }, pass);
    for (let d = 0; d < n; d++) if (clipped[d] !== 0) stayed[clipped[d] - 1] = 1;

    if (wants.marks) {
      if (effect.edges === "wrap") {
        const wrapped = new Uint8Array(n);
        for (let d = 0; d < n; d++) {
          const s = landed[d] - 1;
          if (s >= 0 && !stayed[s] && counted(s)) {
            wrapped[d] = 1;
            picture.wrappedCount++;
          }
        }
        picture.wrapped = wrapped;
      } else {
        const lost: number[] = [];
        for (let s = 0; s < n; s++)
          if (!stayed[s] && counted(s)) {
            picture.lostCount++;
            if (lost.length < 2 * 65536) lost.push(...this.ideal(s, frame.degrees));
          }
        picture.lost = Float32Array.from(lost);
      }
    }
    if (wants.error && pass === 3) {
      const error = new Float32Array(n).fill(Number.NaN);
      let max = 0;
      for (let d = 0; d < n; d++) {
        const s = landed[d] - 1;
        if (s < 0 || !stayed[s] || !counted(s)) continue;
        const [ix, iy] = this.ideal(s, frame.degrees);
        const e = Math.hypot((d % W) + 0.5 - ix, Math.floor(d / W) + 0.5 - iy);
        error[d] = e;
        if (e > max) max = e;
      }
      picture.error = error;
      picture.maxErrorPx = max;
    }
    if (wants.keys && source.keys.length > 0) {
      const at = new Int32Array(n).fill(-1);
      for (let d = 0; d < n; d++) if (landed[d] !== 0) at[landed[d] - 1] = d;
      picture.keys = Float32Array.from(
        source.keys.flatMap(([x, y]) => {
          const d = at[y * W + x];
          return d < 0 ? [Number.NaN, Number.NaN] : [d % W, Math.floor(d / W)];
        }),
      );
    }
    return picture;
  }

  /** Where the ideal turn by `degrees` about the pivot puts the centre of source pixel `s`, in canvas pixels. */
  private ideal(s: number, degrees: number): [number, number] {
    const W = this.source.width;
    const { x: px, y: py } = this.effect.pivot;
    const u = (s % W) + 0.5 - px;
    const v = Math.floor(s / W) + 0.5 - py;
    const t = (degrees * Math.PI) / 180;
    return [px + u * Math.cos(t) - v * Math.sin(t), py + u * Math.sin(t) + v * Math.cos(t)];
  }
}
