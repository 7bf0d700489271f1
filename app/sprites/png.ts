/**
 * Indexed (palette) PNG files in and out, through fast-png.
 * Retro targets keep palette indices as they are, so these functions never reorder a palette.
 */
import { decode, encode } from "fast-png";

/** A palette entry: red, green, blue, alpha, each 0–255. */
export type Rgba = [number, number, number, number];

/** A picture as palette indices, one byte per pixel, row by row from the top left. */
export interface IndexedImage {
  readonly width: number;
  readonly height: number;
  readonly indices: Uint8Array;
  readonly palette: readonly Rgba[];
}

/** The most palette entries an 8-bit indexed PNG can hold (PNG specification, PLTE chunk). */
export const MAX_PALETTE = 256;

/**
 * Encodes an indexed picture as an 8-bit palette PNG.
 * fast-png 8 writes the tRNS chunk from the translucent entries alone, which is only right when they come
 * first; a palette with an opaque entry before a translucent one is refused rather than written wrong.
 */
export function encodeIndexedPng(image: IndexedImage): Uint8Array {
  const { width, height, indices, palette } = image;
  if (!Number.isInteger(width) || width < 1 || !Number.isInteger(height) || height < 1)
    throw new RangeError(`size ${width} × ${height} is not allowed; width and height must be whole numbers of at least 1 pixel`);
  if (indices.length !== width * height)
    throw new RangeError(`indices holds ${indices.length} pixels; a ${width} × ${height} picture needs ${width * height}`);
  if (palette.length < 1 || palette.length > MAX_PALETTE)
    throw new RangeError(`a palette of ${palette.length} entries is not allowed; allowed 1 to ${MAX_PALETTE}`);
  for (const [i, entry] of palette.entries())
    if (entry.length !== 4 || entry.some((c) => !Number.isInteger(c) || c < 0 || c > 255))
      throw new RangeError(`palette[${i}] is ${JSON.stringify(entry)}; each entry is [red, green, blue, alpha] with whole numbers 0 to 255`);
  for (let i = 0; i < indices.length; i++)
    if (indices[i] >= palette.length)
      throw new RangeError(`pixel ${i % width}, ${Math.floor(i / width)} uses index ${indices[i]}; the palette has ${palette.length} entries`);
  const translucent = palette.map((p) => p[3] !== 255);
  const lastTranslucent = translucent.lastIndexOf(true);
  const firstOpaque = translucent.indexOf(false);
  if (lastTranslucent >= 0 && firstOpaque >= 0 && firstOpaque < lastTranslucent)
    throw new RangeError(
      `palette[${lastTranslucent}] is translucent but comes after opaque palette[${firstOpaque}]; put translucent entries first (index 0 for the transparent colour)`,
    );
  return encode({
    width,
    height,
    data: indices,
    depth: 8,
    channels: 1,
    palette: lastTranslucent >= 0 ? palette.map((p) => [...p]) : palette.map(([r, g, b]) => [r, g, b]),
  });
}

/** Decodes a palette PNG into indices and an RGBA palette; refuses other colour types with a clear message. */
export function decodeIndexedPng(bytes: Uint8Array): IndexedImage {
  let png: ReturnType<typeof decode>;
  try {
    png = decode(bytes);
  } catch (error) {
    throw new RangeError(`not a readable PNG file (${(error as Error).message})`);
  }
  if (!png.palette || png.channels !== 1)
    throw new RangeError(
      `the PNG is not indexed (it has ${png.channels} channel${png.channels === 1 ? "" : "s"} and no palette); save it as an indexed-colour (palette) PNG`,
    );
  const { width, height, depth } = png;
  const indices = new Uint8Array(width * height);
  if (depth === 8) {
    indices.set(png.data.subarray(0, width * height));
  } else {
    // Rows of 1-, 2- or 4-bit indices are packed most significant bits first, each row starting on a byte.
    const perByte = 8 / depth;
    const rowBytes = Math.ceil(width / perByte);
    const mask = (1 << depth) - 1;
    for (let y = 0; y < height; y++)
      for (let x = 0; x < width; x++) {
        const byte = png.data[y * rowBytes + Math.floor(x / perByte)];
        const shift = 8 - depth * ((x % perByte) + 1);
        indices[y * width + x] = (byte >> shift) & mask;
      }
  }
  const palette = png.palette.map((p) => [p[0], p[1], p[2], p.length > 3 ? p[3] : 255] as Rgba);
  return { width, height, indices, palette };
}
