/**
 * The source as the bench draws and measures it: the sprite (or a test card) placed in the effect's canvas, which of
 * its pixels count, the key pixels, the sprite's outline and core's canvas-fit advice. No DOM and no React: the
 * bench's Web Worker and the server use it alike.
 */
import {
  canvasFit,
  imagePlane,
  opaqueMask,
  placeImage,
  type CanvasFit,
  type Effect,
  type Image,
  type IndexedImage,
  type Rgba,
} from "@skewsmith/core";
import { keyPixelsOnCanvas, spritePlacement } from "./placement.ts";

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
