/**
 * Reading an uploaded sprite file as an attacker may send it. The cheap checks come first, each with its own
 * message: the size in bytes, then the PNG signature and IHDR header (pngHeader.ts: width and height against the
 * core's canvas limit, before a single pixel is inflated). Then core's decodePng, whose reading is bounded: it walks
 * the chunks (a cut-short file), checks every CRC, and stops inflating as soon as the data passes what the header
 * allows (a decompression bomb), so memory stays near the declared size.
 */
import { decodePng, PngError, type Image } from "@skewsmith/core";
import { readPngHeader, SpriteFileError, SPRITE_MAX_BYTES } from "./pngHeader.ts";

export { PNG_HEADER_BYTES, readPngHeader, SpriteFileError, SPRITE_MAX_BYTES, SPRITE_MAX_SIDE, type PngHeader } from "./pngHeader.ts";

/**
 * Checks an uploaded file (bytes, header) and decodes it with core's decodePng: a palette PNG
 * stays indexed with its palette (index 0 the background), any other PNG becomes 8-bit RGBA. Throws SpriteFileError.
 */
export function decodeSprite(bytes: Uint8Array): Image {
  if (bytes.byteLength > SPRITE_MAX_BYTES)
    throw new SpriteFileError(`The file is ${bytes.byteLength} bytes; sprites can be at most ${SPRITE_MAX_BYTES} bytes (4 MiB).`);
  readPngHeader(bytes);
  try {
    return decodePng(bytes);
  } catch (error) {
    if (error instanceof PngError) {
      const reason = error.message.replace(/^not a readable PNG /, "");
      // Core says "truncated"; a person uploading a file is told it is cut short (a failed or partial download).
      const cut = /^truncated: (.*)$/s.exec(reason);
      throw new SpriteFileError(cut ? `The PNG file is cut short: ${cut[1]}.` : `The PNG cannot be read: ${reason}.`);
    }
    throw error;
  }
}
