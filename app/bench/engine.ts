/**
 * The bench's computing, all of it through core: the source placed in the canvas, every frame's tables and
 * diagnostics (over the sprite's opaque pixels and over the key pixels), one frame drawn up to a pass with what the
 * overlays need, and the canvas-fit advice. No DOM and no React: the bench's Web Worker runs it, and so does the
 * server for the saved effect's diagnostics, so the two can never disagree.
 */
import {
  angleTrack,
  canvasFit,
  compileShifts,
  diagnoseFrames,
  imagePlane,
  opaqueMask,
  placeImage,
  Renderer,
  type CanvasFit,
  type CompiledTables,
  type Effect,
  type FrameTables,
  type FramesDiagnostics,
  type Image,
  type IndexedImage,
  type PixelData,
  type Rgba,
} from "@skewsmith/core";
import { keyPixelsOnCanvas, spritePlacement } from "./placement.ts";
import type { Pass } from "./view.ts";

/** The source as the bench draws and measures it: a canvas-sized picture and which of its pixels count. */
export interface BenchSource {
  readonly width: number;
  readonly height: number;
  readonly image: Image;
  readonly plane: Uint8Array | Uint32Array;
  /** Packed colours (the bytes R, G, B, A in memory order) of an indexed picture's palette; null for RGBA. */
  readonly colours: Uint32Array | null;
  /** The sprite's opaque pixels in the canvas (one byte a pixel), or null without a sprite: then every pixel counts. */
  readonly mask: Uint8Array | null;
  /** How many pixels count (the mask's, or the whole canvas). */
  readonly content: number;
  /** Where the sprite's top-left pixel sits, or null without a sprite. */
  readonly placement: { x: number; y: number } | null;
  /** The key pixels that fall inside the canvas, in canvas pixels, and a mask of them. */
  readonly keys: readonly [number, number][];
  readonly keyMask: Uint8Array | null;
  /** Pairs of key pixels that touch in the source (side or corner), by index into `keys`. */
  readonly keyPairs: readonly [number, number][];
}

/** Colours of the test card drawn when no sprite is attached; every index is opaque, so every pixel counts. */
const CARD_PALETTE: readonly Rgba[] = [
  [40, 52, 64, 255],
  [64, 80, 96, 255],
  [120, 200, 180, 255],
  [230, 196, 110, 255],
  [226, 232, 236, 255],
];

/** A test card for an effect without a sprite: 8-pixel checks, a light border and an arrow pointing up, so turns and flips show. */
export function testCard(width: number, height: number): IndexedImage {
  const data = new Uint8Array(width * height);
  const cx = width / 2;
  const cy = height / 2;
  const size = Math.max(2, Math.min(width, height) / 3);
  for (let y = 0; y < height; y++)
    for (let x = 0; x < width; x++) {
      let index = ((x >> 3) + (y >> 3)) % 2;
      // The arrow: a triangle above the centre and a stem below it.
      const dy = y + 0.5 - cy;
      const dx = Math.abs(x + 0.5 - cx);
      if (dy < 0 && dy > -size && dx < (size + dy) * 0.6) index = 3;
      if (dy >= 0 && dy < size * 0.8 && dx < size * 0.15) index = 3;
      if (x === 0 || y === 0 || x === width - 1 || y === height - 1) index = 2;
      if (x === 1 || y === 1 || x === width - 2 || y === height - 2) index = index === 3 ? 3 : 4;
      data[y * width + x] = index;
    }
  return { kind: "indexed", width, height, data, palette: CARD_PALETTE };
}

/** The palette as packed colours in memory order, so a Uint32Array over RGBA bytes can take them whole. */
function packPalette(palette: readonly Rgba[]): Uint32Array {
  const bytes = new Uint8Array(palette.length * 4);
  palette.forEach((c, i) => bytes.set(c, i * 4));
  return new Uint32Array(bytes.buffer);
}

/**
 * Places the sprite (or the test card) in the effect's canvas. Key pixels are in sprite pixels (canvas pixels without
 * a sprite); those that fall outside the canvas are left out.
 */
export function prepareSource(
  effect: Effect,
  sprite: Image | null,
  spriteX: number | null,
  spriteY: number | null,
  keyPixels: readonly (readonly [number, number])[],
): BenchSource {
  const { width, height } = effect.canvas;
  const placed = sprite ? spritePlacement(effect.canvas, sprite, spriteX, spriteY) : null;
  const placement = placed ? { x: placed.x, y: placed.y } : null;
  const image = sprite && placement ? placeImage(sprite, width, height, placement.x, placement.y) : testCard(width, height);
  const mask = sprite ? opaqueMask(image) : null;
  let content = width * height;
  if (mask) {
    content = 0;
    for (let i = 0; i < mask.length; i++) content += mask[i];
  }
  const keys = keyPixelsOnCanvas(keyPixels, placement).filter(([x, y]) => x >= 0 && y >= 0 && x < width && y < height);
  let keyMask: Uint8Array | null = null;
  if (keys.length > 0) {
    keyMask = new Uint8Array(width * height);
    for (const [x, y] of keys) keyMask[y * width + x] = 1;
  }
  const keyPairs: [number, number][] = [];
  for (let i = 0; i < keys.length; i++)
    for (let j = i + 1; j < keys.length; j++)
      if (Math.max(Math.abs(keys[i][0] - keys[j][0]), Math.abs(keys[i][1] - keys[j][1])) === 1) keyPairs.push([i, j]);
  const plane = imagePlane(image);
  return {
    width,
    height,
    image,
    plane,
    colours: image.kind === "indexed" ? packPalette(image.palette) : null,
    mask,
    content,
    placement,
    keys,
    keyMask,
    keyPairs,
  };
}

/** One row of the per-frame table. */
export interface FrameRow {
  index: number;
  /** The angle as the track gives it (degrees, before normalising). */
  written: number;
  degrees: number;
  residualDegrees: number;
  flip: boolean;
  alpha: number;
  beta: number;
  saturated: boolean;
  maxAbsShift: number;
  maxErrorPx: number;
  meanErrorPx: number;
  wrapped: number;
  clipped: number;
  /** Largest error over the key pixels, or null when none are marked. */
  keyMaxErrorPx: number | null;
  /** Pairs of key pixels that touched in the source and no longer do (or were lost), or null when none are marked. */
  keyApart: number | null;
}

/** A Renderer for the plane type of `plane`, made on first use and reused. */
class Renderers {
  private byType = new Map<string, Renderer<PixelData>>();
  constructor(
    readonly width: number,
    readonly height: number,
  ) {}
  for<T extends PixelData>(plane: T): Renderer<T> {
    const name = plane.constructor.name;
    let renderer = this.byType.get(name);
    if (!renderer) {
      renderer = new Renderer(this.width, this.height, plane.constructor as { new (n: number): T });
      this.byType.set(name, renderer);
    }
    return renderer as unknown as Renderer<T>;
  }
}

/** About how many pixel checks one step of TrackDiagnosis makes at most (one frame at least). */
const DIAGNOSE_PIXELS_PER_STEP = 1 << 20;

/**
 * Measures a whole track frame by frame, so a caller can stop between frames, show rows as they come, or give up when
 * the settings changed. Core's diagnoseFrames does the measuring (with the sprite's mask and with the key pixels'),
 * and core's Renderer follows the key pixels to count the neighbours that came apart.
 */
export class TrackDiagnosis {
  readonly tables: CompiledTables<FrameTables>;
  readonly written: number[];
  private next = 0;
  private readonly keyPlane: Uint16Array | null;
  private readonly renderers: Renderers;

  constructor(
    readonly effect: Effect,
    readonly source: BenchSource,
    tables?: CompiledTables<FrameTables>,
  ) {
    this.tables = tables ?? compileShifts(effect);
    this.written = angleTrack(effect.angles);
    this.renderers = new Renderers(effect.canvas.width, effect.canvas.height);
    if (source.keys.length > 0) {
      this.keyPlane = new Uint16Array(source.width * source.height);
      source.keys.forEach(([x, y], k) => (this.keyPlane![y * source.width + x] = k + 1));
    } else this.keyPlane = null;
  }

  get total(): number {
    return this.tables.frames.length;
  }

  get done(): number {
    return this.next;
  }

  /**
   * Measures frames until `deadline` (a performance.now() time) or the end, at least one; returns their rows. The
   * errors and edge counts come from core's diagnoseFrames, the module the command line's worker threads run, a few
   * frames at a time (fewer on a big canvas, so a new message never waits long).
   */
  step(deadline = Infinity): FrameRow[] {
    const rows: FrameRow[] = [];
    const { frames } = this.tables;
    const { effect, source } = this;
    const chunk = Math.max(1, Math.min(8, Math.floor(DIAGNOSE_PIXELS_PER_STEP / (source.width * source.height))));
    do {
      if (this.next >= frames.length) break;
      const range = { start: this.next, end: Math.min(frames.length, this.next + chunk) };
      const d = diagnoseFrames(effect, range, source.mask ?? undefined);
      const keys = source.keyMask && this.keyPlane ? diagnoseFrames(effect, range, source.keyMask) : null;
      for (let i = range.start; i < range.end; i++) rows.push(this.row(frames[i], d, keys));
      this.next = range.end;
    } while (performance.now() < deadline);
    return rows;
  }

  /** Every remaining row at once. */
  all(): FrameRow[] {
    return this.step(Infinity);
  }

  private row(frame: FrameTables, d: FramesDiagnostics, keys: FramesDiagnostics | null): FrameRow {
    const i = frame.index - d.start;
    let keyMaxErrorPx: number | null = null;
    let keyApart: number | null = null;
    if (keys && this.keyPlane) {
      keyMaxErrorPx = keys.maxErrorPx[i];
      keyApart = this.apart(frame);
    }
    return {
      index: frame.index,
      written: this.written[frame.index],
      degrees: frame.degrees,
      residualDegrees: frame.residualDegrees,
      flip: frame.flip,
      alpha: frame.alpha,
      beta: frame.beta,
      saturated: frame.saturated,
      maxAbsShift: frame.maxAbsShift,
      maxErrorPx: d.maxErrorPx[i],
      meanErrorPx: d.meanErrorPx[i],
      wrapped: d.wrapped[i],
      clipped: d.clipped[i],
      keyMaxErrorPx,
      keyApart,
    };
  }

  /** Key-pixel pairs that touched in the source and do not touch in the frame (a lost pixel touches nothing). */
  private apart(frame: FrameTables): number {
    const out = this.renderers.for(this.keyPlane!).render(this.keyPlane!, frame, this.effect, 3);
    const at = keyDestinations(out, this.source.keys.length);
    let apart = 0;
    for (const [i, j] of this.source.keyPairs) {
      const a = at[i];
      const b = at[j];
      if (a < 0 || b < 0) apart++;
      else {
        const w = this.source.width;
        if (Math.max(Math.abs((a % w) - (b % w)), Math.abs(Math.floor(a / w) - Math.floor(b / w))) > 1) apart++;
      }
    }
    return apart;
  }
}

/** Where each marked pixel (value k + 1 in a rendered plane) landed, as a pixel index, or −1 when it was lost. */
function keyDestinations(plane: ArrayLike<number>, count: number): Int32Array {
  const at = new Int32Array(count).fill(-1);
  for (let i = 0; i < plane.length; i++) {
    const v = plane[i];
    if (v !== 0) at[v - 1] = i;
  }
  return at;
}

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

/**
 * The outline of the counted pixels (the sprite's opaque ones, or the whole canvas) as line segments along pixel
 * edges, [x0, y0, x1, y1, …] in canvas pixels; runs along a row or column are joined into one segment.
 */
export function outline(source: BenchSource): Float32Array<ArrayBuffer> {
  const { width: W, height: H, mask } = source;
  if (!mask) return Float32Array.from([0, 0, W, 0, W, 0, W, H, W, H, 0, H, 0, H, 0, 0]);
  const at = (x: number, y: number) => (x >= 0 && y >= 0 && x < W && y < H ? mask[y * W + x] : 0);
  const out: number[] = [];
  // Horizontal edges between rows y−1 and y.
  for (let y = 0; y <= H; y++) {
    let start = -1;
    for (let x = 0; x <= W; x++) {
      const edge = x < W && at(x, y - 1) !== at(x, y);
      if (edge && start < 0) start = x;
      if (!edge && start >= 0) {
        out.push(start, y, x, y);
        start = -1;
      }
    }
  }
  // Vertical edges between columns x−1 and x.
  for (let x = 0; x <= W; x++) {
    let start = -1;
    for (let y = 0; y <= H; y++) {
      const edge = y < H && at(x - 1, y) !== at(x, y);
      if (edge && start < 0) start = y;
      if (!edge && start >= 0) {
        out.push(x, start, x, y);
        start = -1;
      }
    }
  }
  return Float32Array.from(out);
}

/** Core's canvas-fit advice for the counted pixels, rounded up to `align` pixels. */
export function fitAdvice(effect: Effect, source: BenchSource, align = 1): CanvasFit {
  return canvasFit(effect, { mask: source.mask ?? undefined, align });
}

/** Pixels times frames, the work of measuring a whole track: the server measures only up to a limit. */
export function diagnosisCost(effect: Effect): number {
  const frames = "list" in effect.angles ? effect.angles.list.length : effect.angles.sweep.frames;
  return effect.canvas.width * effect.canvas.height * frames;
}
