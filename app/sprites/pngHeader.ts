/**
 * The cheap first checks of an uploaded sprite file: its size limit, the PNG signature and the IHDR header (width and
 * height against the core's canvas limit), each with its own message. No decoding and nothing but the core's limits
 * imported, so the upload form runs `readPngHeader` in the browser on the first bytes of a chosen file and answers
 * before the upload. The server runs the same checks again (spriteFile.ts).
 *
 * The header reader is the app's own until core's PNG module has one; then this calls core's.
 */
import { LIMITS } from "@skewsmith/core";

/** Largest sprite file accepted, in bytes (4 MiB). */
export const SPRITE_MAX_BYTES = 4 * 1024 * 1024;
/** Largest sprite width and height, in pixels: the core's canvas limit, since a sprite is placed into a canvas. */
export const SPRITE_MAX_SIDE = LIMITS.canvas.max;
/** Bytes a header check needs: the signature, then the IHDR chunk (length, type, 13 bytes of data, CRC). */
export const PNG_HEADER_BYTES = 33;

/** A sprite file that cannot be used; the message says why, in words for the person who uploaded it. */
export class SpriteFileError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "SpriteFileError";
  }
}

/** What a PNG's IHDR chunk declares (PNG specification, ISO/IEC 15948:2004 §11.2.2). */
export interface PngHeader {
  readonly width: number;
  readonly height: number;
  readonly bitDepth: number;
  readonly colourType: number;
  readonly interlaced: boolean;
  /** Bits of one pixel: the bit depth times the samples per pixel of the colour type. */
  readonly bitsPerPixel: number;
  /** Palette PNGs (colour type 3) stay indexed; every other colour type is read as 8-bit RGBA. */
  readonly kind: "indexed" | "rgba";
}

// PNG specification §5.2: the eight signature bytes.
const SIGNATURE = [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a];
// PNG specification §11.2.2, table 11.1: the bit depths allowed for each colour type, and samples per pixel.
const DEPTHS: Record<number, readonly number[]> = { 0: [1, 2, 4, 8, 16], 2: [8, 16], 3: [1, 2, 4, 8], 4: [8, 16], 6: [8, 16] };
const SAMPLES: Record<number, number> = { 0: 1, 2: 3, 3: 1, 4: 2, 6: 4 };

/** Magic numbers of files people upload by mistake (from their formats' published headers), to name what was sent. */
function otherFormat(bytes: Uint8Array): string | null {
  const starts = (...b: number[]) => b.every((v, i) => bytes[i] === v);
  const ascii = (from: number, text: string) => [...text].every((ch, i) => bytes[from + i] === ch.charCodeAt(0));
  if (starts(0xff, 0xd8, 0xff)) return "a JPEG picture";
  if (ascii(0, "GIF8")) return "a GIF picture";
  if (ascii(0, "BM")) return "a BMP picture";
  if (ascii(0, "RIFF") && ascii(8, "WEBP")) return "a WebP picture";
  if (ascii(0, "II*\0") || ascii(0, "MM\0*")) return "a TIFF picture";
  if (ascii(0, "8BPS")) return "a Photoshop document";
  if (ascii(0, "%PDF")) return "a PDF document";
  if (ascii(0, "PK")) return "a zip archive";
  const head = new TextDecoder().decode(bytes.subarray(0, 256)).trimStart().toLowerCase();
  if (head.startsWith("<svg") || (head.startsWith("<?xml") && head.includes("<svg"))) return "an SVG drawing";
  if (head.startsWith("<")) return "an HTML or XML text";
  return null;
}

/** A big-endian 32-bit unsigned integer (PNG spec §7.1), and a chunk's four-letter type. */
export const u32 = (b: Uint8Array, at: number) => ((b[at] << 24) | (b[at + 1] << 16) | (b[at + 2] << 8) | b[at + 3]) >>> 0;
export const chunkType = (b: Uint8Array, at: number) => String.fromCharCode(b[at], b[at + 1], b[at + 2], b[at + 3]);

/**
 * Reads the signature and IHDR chunk from the first PNG_HEADER_BYTES of a file and checks them against the PNG
 * specification and the sprite limits; throws a SpriteFileError naming the problem and the allowed range.
 */
export function readPngHeader(bytes: Uint8Array): PngHeader {
  if (bytes.length === 0) throw new SpriteFileError("The file is empty.");
  if (!SIGNATURE.every((v, i) => bytes[i] === v)) {
    const other = bytes.length >= 2 ? otherFormat(bytes) : null;
    throw new SpriteFileError(
      `This is not a PNG file${other ? `: it looks like ${other}` : ""} (it does not start with the PNG signature). Save the sprite as PNG, indexed or RGBA.`,
    );
  }
  if (bytes.length < PNG_HEADER_BYTES)
    throw new SpriteFileError(`The file is cut short: ${bytes.length} bytes, too few to hold a PNG header.`);
  if (chunkType(bytes, 12) !== "IHDR" || u32(bytes, 8) !== 13)
    throw new SpriteFileError("The PNG file is damaged: its first chunk is not a 13-byte IHDR header, as the PNG specification requires.");
  const width = u32(bytes, 16);
  const height = u32(bytes, 20);
  const [bitDepth, colourType, compression, filter, interlace] = [bytes[24], bytes[25], bytes[26], bytes[27], bytes[28]];
  if (width === 0 || height === 0)
    throw new SpriteFileError(`The PNG declares ${width} × ${height} pixels; a picture needs at least one pixel.`);
  if (width > SPRITE_MAX_SIDE || height > SPRITE_MAX_SIDE)
    throw new SpriteFileError(
      `The picture is ${width} × ${height} pixels; sprites can be at most ${SPRITE_MAX_SIDE} × ${SPRITE_MAX_SIDE} (the largest canvas).`,
    );
  if (!(colourType in DEPTHS))
    throw new SpriteFileError(`The PNG declares colour type ${colourType}; the PNG specification allows 0, 2, 3, 4 and 6.`);
  if (!DEPTHS[colourType].includes(bitDepth))
    throw new SpriteFileError(
      `The PNG declares ${bitDepth}-bit samples for colour type ${colourType}; the PNG specification allows ${DEPTHS[colourType].join(", ")}.`,
    );
  if (compression !== 0 || filter !== 0 || interlace > 1)
    throw new SpriteFileError("The PNG declares a compression, filter or interlace method the PNG specification does not define.");
  return {
    width,
    height,
    bitDepth,
    colourType,
    interlaced: interlace === 1,
    bitsPerPixel: bitDepth * SAMPLES[colourType],
    kind: colourType === 3 ? "indexed" : "rgba",
  };
}
