/**
 * A frame's pixels as the preview shows them: error shading, and the integer zoom done in the worker, so the page
 * draws a frame with one putImageData. Plain typed-array code (no DOM), shared by the worker, the page and bench/.
 */
import type { FramePicture } from "./framePainter.ts";

/** Error shading: the upper bound of each band in pixels and its colour (a diverging blue-yellow-red scale; ColorBrewer RdYlBu, from memory). */
export const ERROR_BANDS: readonly { below: number; label: string; rgb: [number, number, number] }[] = [
  { below: 0.25, label: "under 0.25 px", rgb: [44, 123, 182] },
  { below: 0.5, label: "0.25 to 0.5 px", rgb: [171, 217, 233] },
  { below: 0.75, label: "0.5 to 0.75 px", rgb: [255, 255, 191] },
  { below: 1, label: "0.75 to 1 px", rgb: [253, 174, 97] },
  { below: Infinity, label: "1 px or more", rgb: [215, 25, 28] },
];

/**
 * The largest zoomed picture the worker prepares, in pixels (32 MiB of RGBA). A bigger one (a large canvas at a high
 * zoom) is drawn the slower way, from the 1× pixels scaled by the canvas, rather than held several times in memory.
 */
export const DISPLAY_MAX_PIXELS = 8 * 1024 * 1024;

/** The zoomed pixels of a frame, ready for one putImageData on a canvas of (width × zoom) × (height × zoom). */
export interface FrameDisplay {
  zoom: number;
  /** Whether the pixels are error-shaded (see errorShading). */
  shaded: boolean;
  pixels: Uint8ClampedArray<ArrayBuffer>;
}

/** The frame's pixels with counted pixels recoloured by their error band; other pixels dimmed. */
export function errorShading(picture: FramePicture): Uint8ClampedArray<ArrayBuffer> {
  const { rgba, error } = picture;
  const out = new Uint8ClampedArray(rgba.length);
  for (let i = 0, p = 0; p < rgba.length; i++, p += 4) {
    const e = error ? error[i] : Number.NaN;
    if (Number.isNaN(e)) {
      out[p] = rgba[p] * 0.3;
      out[p + 1] = rgba[p + 1] * 0.3;
      out[p + 2] = rgba[p + 2] * 0.3;
      out[p + 3] = rgba[p + 3];
      continue;
    }
    let band = 0;
    while (e >= ERROR_BANDS[band].below) band++;
    const [r, g, b] = ERROR_BANDS[band].rgb;
    out[p] = r;
    out[p + 1] = g;
    out[p + 2] = b;
    out[p + 3] = 255;
  }
  return out;
}

/**
 * `rgba` (width × height) at an integer zoom, each pixel a zoom × zoom block (nearest neighbour): one output row is
 * built per source row and copied zoom − 1 times below itself. Written into `into` when that buffer has the right size
 * (every byte is overwritten): a fresh megabyte-sized buffer costs more in page faults than the zoom itself.
 */
export function zoomPixels(
  rgba: Uint8ClampedArray<ArrayBuffer>,
  width: number,
  height: number,
  zoom: number,
  into?: ArrayBuffer,
): Uint8ClampedArray<ArrayBuffer> {
  if (!Number.isInteger(zoom) || zoom < 1) throw new RangeError(`zoom: ${zoom} is not allowed; allowed a whole number from 1`);
  if (rgba.length !== width * height * 4) throw new RangeError(`rgba: ${rgba.length} bytes is not ${width} × ${height} × 4`);
  const rowLength = width * zoom;
  const bytes = rowLength * height * zoom * 4;
  const buffer = into && into.byteLength === bytes ? into : new ArrayBuffer(bytes);
  if (zoom === 1) {
    const copy = new Uint8ClampedArray(buffer);
    copy.set(rgba);
    return copy;
  }
  const source = new Uint32Array(rgba.buffer, rgba.byteOffset, width * height);
  const out = new Uint32Array(buffer);
  for (let y = 0; y < height; y++) {
    const row = y * zoom * rowLength;
    let o = row;
    for (let x = y * width, end = x + width; x < end; x++) {
      const v = source[x];
      for (let k = 0; k < zoom; k++) out[o++] = v;
    }
    for (let k = 1; k < zoom; k++) out.copyWithin(row + k * rowLength, row, row + rowLength);
  }
  return new Uint8ClampedArray(out.buffer);
}

/** What the preview shows of `picture` at `zoom` (shaded when asked and the error is there), or null when too big. */
export function frameDisplay(
  picture: FramePicture,
  width: number,
  height: number,
  zoom: number,
  shade: boolean,
  into?: ArrayBuffer,
): FrameDisplay | null {
  if (width * zoom * height * zoom > DISPLAY_MAX_PIXELS) return null;
  const shaded = shade && picture.error !== null;
  return { zoom, shaded, pixels: zoomPixels(shaded ? errorShading(picture) : picture.rgba, width, height, zoom, into) };
}
