/**
 * Frames of an effect as pictures: the sprite placed in the canvas (pass 0), and each frame after pass 1, 2 or 3,
 * all drawn by core (compileFrame / compileShifts, Renderer, placeImage). A contact sheet lays chosen frames out in
 * a grid for a forum post or a review. Browser-safe: the bench may draw the same pictures.
 */
import {
  angleTrack,
  compileFrame,
  compileShifts,
  imageFromPlane,
  imagePlane,
  placeImage,
  Renderer,
  type Effect,
  type FrameShifts,
  type Image,
  type PassNumber,
  type Rgba,
} from "@skewsmith/core";
import { spritePlacement } from "./placement.ts";

/** Which picture of a frame: 0 the source placed in the canvas, 1 after the first row pass, 2 after the column pass, 3 the frame. */
export type FramePass = 0 | PassNumber;
export const FRAME_PASSES: readonly FramePass[] = [0, 1, 2, 3];
/** What each pass shows, for messages and file names. */
export const PASS_WORDS: Record<FramePass, string> = {
  0: "the source placed in the canvas",
  1: "after the first row pass",
  2: "after the column pass",
  3: "the finished frame",
};

/** The effect's canvas-sized source: the sprite placed at (spriteX, spriteY), or centred when they are null (core's placeImage). */
export function placedSource(effect: Effect, sprite: Image, spriteX: number | null, spriteY: number | null): Image {
  const { width, height } = effect.canvas;
  const at = spritePlacement(effect.canvas, sprite, spriteX, spriteY);
  return placeImage(sprite, width, height, at.x, at.y);
}

/** Number of frames in the effect's angle track. */
export const frameCount = (effect: Effect): number => angleTrack(effect.angles).length;

/** One frame's picture after `pass` (0 = the source itself), of the source's kind and palette. */
export function framePicture(effect: Effect, source: Image, frame: number, pass: FramePass): Image {
  const degrees = angleTrack(effect.angles);
  if (!Number.isInteger(frame) || frame < 0 || frame >= degrees.length)
    throw new RangeError(`frame: ${frame} is not allowed; allowed a whole number from 0 to ${degrees.length - 1}`);
  if (pass === 0) return source;
  const tables = compileFrame(effect, frame, degrees[frame]);
  return render(source, effect, [tables], pass)[0];
}

/** Draws the given frames (tables from core) of one source, reusing one renderer. */
function render(source: Image, effect: Effect, frames: readonly FrameShifts[], pass: PassNumber): Image[] {
  const { width, height } = effect.canvas;
  const plane = imagePlane(source);
  const renderer = (
    plane instanceof Uint8Array ? new Renderer(width, height, Uint8Array) : new Renderer(width, height, Uint32Array)
  ) as Renderer<typeof plane>;
  return frames.map((f) => imageFromPlane(source, renderer.render(plane, f, effect, pass)));
}

/** Largest contact sheet, in pixels: the area of the core's largest canvas (4096 × 4096), and no side beyond 16384. */
export const SHEET_MAX_PIXELS = 4096 * 4096;
export const SHEET_MAX_SIDE = 16384;
/** Gap between cells and around the sheet, in sheet pixels. */
export const SHEET_GAP = 2;
/** Largest zoom of a sheet (whole screen pixels per canvas pixel). */
export const SHEET_MAX_ZOOM = 8;
/** Colour of the gaps: a mid grey that reads against dark and light pictures and against transparency. */
export const SHEET_GAP_COLOUR: Rgba = [96, 104, 112, 255];

/** How a contact sheet is laid out: which frames, in how many columns, at what zoom, and its size. */
export interface SheetLayout {
  readonly frames: readonly number[];
  readonly every: number;
  readonly columns: number;
  readonly rows: number;
  readonly zoom: number;
  readonly width: number;
  readonly height: number;
}

/** A layout that cannot be made within the limits; the message says what to change. */
export class SheetError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "SheetError";
  }
}

function layoutFor(total: number, canvas: Effect["canvas"], zoom: number, every: number, columns?: number): SheetLayout {
  const frames = Array.from({ length: Math.ceil(total / every) }, (_, i) => i * every);
  const cellW = canvas.width * zoom;
  const cellH = canvas.height * zoom;
  // Roughly square by default: columns ≈ √(n · cell height / cell width).
  const cols = Math.min(frames.length, columns ?? Math.max(1, Math.ceil(Math.sqrt((frames.length * cellH) / cellW))));
  const rows = Math.ceil(frames.length / cols);
  return {
    frames,
    every,
    columns: cols,
    rows,
    zoom,
    width: cols * cellW + (cols + 1) * SHEET_GAP,
    height: rows * cellH + (rows + 1) * SHEET_GAP,
  };
}

const fits = (l: SheetLayout) => l.width * l.height <= SHEET_MAX_PIXELS && l.width <= SHEET_MAX_SIDE && l.height <= SHEET_MAX_SIDE;
const sizeWords = (l: SheetLayout) => `${l.width} × ${l.height} pixels`;
const LIMIT_WORDS = `at most ${SHEET_MAX_PIXELS} pixels (4096 × 4096) and ${SHEET_MAX_SIDE} on a side`;

/**
 * The layout of a contact sheet of `total` frames: every `every`-th frame from 0, at `zoom`, in `columns` columns
 * (or roughly square). Without `every`, the smallest step that keeps the sheet within SHEET_MAX_PIXELS; with one,
 * a sheet beyond the limit is refused (SheetError) rather than silently thinned.
 */
export function sheetLayout(
  total: number,
  canvas: Effect["canvas"],
  options: { zoom?: number; every?: number; columns?: number } = {},
): SheetLayout {
  const zoom = options.zoom ?? 1;
  if (options.every !== undefined) {
    const layout = layoutFor(total, canvas, zoom, options.every, options.columns);
    if (!fits(layout))
      throw new SheetError(
        `A sheet of every ${options.every === 1 ? "" : `${options.every}th `}frame at zoom ${zoom} would be ${sizeWords(layout)}; sheets are ${LIMIT_WORDS}. Take fewer frames (a larger every), a smaller zoom or other columns.`,
      );
    return layout;
  }
  for (let every = 1; every <= total; every++) {
    const layout = layoutFor(total, canvas, zoom, every, options.columns);
    if (fits(layout)) return layout;
  }
  const one = layoutFor(total, canvas, zoom, total, options.columns);
  throw new SheetError(
    `Even one frame at zoom ${zoom} makes a sheet of ${sizeWords(one)}; sheets are ${LIMIT_WORDS}. Use a smaller zoom, or download single frames.`,
  );
}

/**
 * The contact sheet: each chosen frame after `pass`, left to right and top to bottom, scaled by whole pixels, with
 * SHEET_GAP pixels of SHEET_GAP_COLOUR between and around the cells. An indexed source gives an indexed sheet (its
 * palette plus the gap colour as one more entry) while the palette has room; otherwise the sheet is RGBA.
 */
export function contactSheet(effect: Effect, source: Image, pass: FramePass, layout: SheetLayout): Image {
  const { width: W, height: H } = effect.canvas;
  const pictures =
    pass === 0
      ? layout.frames.map(() => source)
      : (() => {
          const all = compileShifts(effect).frames;
          return render(
            source,
            effect,
            layout.frames.map((i) => all[i]),
            pass,
          );
        })();
  const z = layout.zoom;
  const indexed = source.kind === "indexed" && source.palette.length < 256;
  const bpp = indexed ? 1 : 4;
  const data = new Uint8Array(layout.width * layout.height * bpp);
  // Fill with the gap colour, then draw each cell over it.
  if (indexed) data.fill(source.palette.length);
  else new Uint32Array(data.buffer).fill(new Uint32Array(Uint8Array.from(SHEET_GAP_COLOUR).buffer)[0]);
  const toRgba = (image: Image): Uint8Array => {
    if (image.kind === "rgba") return image.data;
    const out = new Uint8Array(W * H * 4);
    for (let i = 0; i < W * H; i++) out.set(image.palette[image.data[i]], i * 4);
    return out;
  };
  pictures.forEach((picture, k) => {
    const pixels = indexed ? picture.data : toRgba(picture);
    const x0 = SHEET_GAP + (k % layout.columns) * (W * z + SHEET_GAP);
    const y0 = SHEET_GAP + Math.floor(k / layout.columns) * (H * z + SHEET_GAP);
    for (let r = 0; r < H; r++) {
      // One scaled row, then copied z times down.
      const line = new Uint8Array(W * z * bpp);
      for (let c = 0; c < W; c++)
        for (let dz = 0; dz < z; dz++) line.set(pixels.subarray((r * W + c) * bpp, (r * W + c + 1) * bpp), (c * z + dz) * bpp);
      for (let dz = 0; dz < z; dz++) data.set(line, ((y0 + r * z + dz) * layout.width + x0) * bpp);
    }
  });
  if (indexed && source.kind === "indexed")
    return { kind: "indexed", width: layout.width, height: layout.height, data, palette: [...source.palette, SHEET_GAP_COLOUR] };
  return { kind: "rgba", width: layout.width, height: layout.height, data };
}
