/**
 * Reading an uploaded sprite file as an attacker may send it. The cheap checks come first, in this order, each with
 * its own message: the size in bytes, the PNG signature and IHDR header (pngHeader.ts: width and height against the
 * core's canvas limit, before a single pixel is inflated), the chunk layout (a cut-short file), how much the image
 * data inflates to (a decompression bomb); only then does core's decodePng read the pixels.
 *
 * The chunk walk and the inflate bound are the app's own until core's PNG reader checks the same (bounded
 * decoding); then `decodeSprite` calls core's and these go.
 */
import { decodePng, PngError, type Image } from "@skewsmith/core";
import { Unzlib } from "fflate";
import { chunkType, readPngHeader, SpriteFileError, SPRITE_MAX_BYTES, u32, type PngHeader } from "./pngHeader.ts";

export { PNG_HEADER_BYTES, readPngHeader, SpriteFileError, SPRITE_MAX_BYTES, SPRITE_MAX_SIDE, type PngHeader } from "./pngHeader.ts";

/** Size of the filtered image data a header implies, in bytes: per row one filter byte and the packed samples (§7, §8.2 for Adam7). */
function rawSize(header: PngHeader): number {
  const bits = header.bitsPerPixel;
  const rows = (w: number, h: number) => (w > 0 && h > 0 ? h * (1 + Math.ceil((w * bits) / 8)) : 0);
  if (!header.interlaced) return rows(header.width, header.height);
  // Adam7's seven passes: (first column, first row, column step, row step).
  const passes = [
    [0, 0, 8, 8],
    [4, 0, 8, 8],
    [0, 4, 4, 8],
    [2, 0, 4, 4],
    [0, 2, 2, 4],
    [1, 0, 2, 2],
    [0, 1, 1, 2],
  ];
  return passes.reduce((n, [x0, y0, dx, dy]) => n + rows(Math.ceil((header.width - x0) / dx), Math.ceil((header.height - y0) / dy)), 0);
}

/** Walks the chunks after IHDR: each must fit in the file, there must be image data, and IEND must end it. Returns the IDAT payloads. */
function imageData(bytes: Uint8Array, header: PngHeader): Uint8Array[] {
  const idat: Uint8Array[] = [];
  let palette = false;
  for (let at = 8; ;) {
    if (at + 8 > bytes.length)
      throw new SpriteFileError(`The PNG file is cut short: it ends at byte ${bytes.length} without the IEND chunk that closes a PNG.`);
    const length = u32(bytes, at);
    const type = chunkType(bytes, at + 4);
    if (at + 12 + length > bytes.length)
      throw new SpriteFileError(
        `The PNG file is cut short: its ${type} chunk needs ${length} bytes of data, but the file ends at byte ${bytes.length}.`,
      );
    if (type === "PLTE") palette = true;
    if (type === "IDAT") idat.push(bytes.subarray(at + 8, at + 8 + length));
    if (type === "IEND") break;
    at += 12 + length;
  }
  if (idat.length === 0) throw new SpriteFileError("The PNG file has no image data (no IDAT chunk).");
  if (header.colourType === 3 && !palette) throw new SpriteFileError("The PNG is a palette PNG without a palette (no PLTE chunk).");
  return idat;
}

/** Compressed bytes fed to the inflater at a time: at deflate's best ratio (about 1032 : 1) one slice gives at most ~4 MiB. */
const INFLATE_SLICE = 4096;

/** Inflates the image data only to count it, and stops as soon as it passes what the header allows (a decompression bomb). */
function checkInflatedSize(idat: Uint8Array[], header: PngHeader): void {
  const expected = rawSize(header);
  let total = 0;
  let over = false;
  const inflater = new Unzlib((chunk) => {
    total += chunk.length;
    if (total > expected) over = true;
  });
  try {
    for (const part of idat)
      for (let i = 0; i < part.length && !over; i += INFLATE_SLICE) inflater.push(part.subarray(i, i + INFLATE_SLICE), false);
    if (!over) inflater.push(new Uint8Array(0), true);
  } catch (error) {
    if (!over) throw new SpriteFileError(`The PNG's image data is damaged and cannot be inflated (${(error as Error).message}).`);
  }
  if (over)
    throw new SpriteFileError(
      `The PNG's image data inflates to more than the ${expected} bytes its ${header.width} × ${header.height} header allows; the file is refused.`,
    );
  if (total < expected)
    throw new SpriteFileError(
      `The PNG's image data is cut short: it inflates to ${total} bytes, but ${header.width} × ${header.height} pixels need ${expected}.`,
    );
}

/**
 * Checks an uploaded file (bytes, header, chunks, inflated size) and decodes it with core's decodePng: a palette PNG
 * stays indexed with its palette (index 0 the background), any other PNG becomes 8-bit RGBA. Throws SpriteFileError.
 */
export function decodeSprite(bytes: Uint8Array): Image {
  if (bytes.byteLength > SPRITE_MAX_BYTES)
    throw new SpriteFileError(`The file is ${bytes.byteLength} bytes; sprites can be at most ${SPRITE_MAX_BYTES} bytes (4 MiB).`);
  const header = readPngHeader(bytes);
  checkInflatedSize(imageData(bytes, header), header);
  try {
    return decodePng(bytes);
  } catch (error) {
    if (error instanceof PngError)
      throw new SpriteFileError(`The PNG cannot be read: ${error.message.replace(/^not a readable PNG /, "")}.`);
    throw error;
  }
}
