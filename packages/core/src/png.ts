import { zlibSync } from "fflate";
import { crc32 as crc32Js } from "./crc32.ts";
import type { Image, IndexedImage, Rgba } from "./image.ts";
import { LIMITS } from "./limits.ts";
import { nodeZlib } from "./nodeZlib.ts";
import { PngError } from "./pngError.ts";
import { inflateImageData } from "./pngInflate.ts";

export { PngError };

/** What a PNG's IHDR chunk declares (PNG specification §11.2.2), read without touching the image data. */
export interface PngHeader {
  /** Width and height in pixels, as declared. */
  readonly width: number;
  readonly height: number;
  /** Bits per sample (per palette index for colour type 3): 1, 2, 4, 8 or 16. */
  readonly bitDepth: number;
  /** 0 greyscale, 2 RGB, 3 palette, 4 greyscale with alpha, 6 RGBA. */
  readonly colorType: 0 | 2 | 3 | 4 | 6;
  /** Adam7 interlacing. */
  readonly interlaced: boolean;
  /** What decodePng makes of it: a palette PNG stays indexed, anything else becomes RGBA. */
  readonly kind: "indexed" | "rgba";
}

/** The eight bytes every PNG starts with (PNG specification §5.2). */
const SIGNATURE = [137, 80, 78, 71, 13, 10, 26, 10];

/** Bit depths allowed for each colour type, and samples per pixel (PNG specification §11.2.2, Table 11.1). */
const COLOR_TYPES: Readonly<Record<number, { readonly depths: readonly number[]; readonly channels: number }>> = {
  0: { depths: [1, 2, 4, 8, 16], channels: 1 },
  2: { depths: [8, 16], channels: 3 },
  3: { depths: [1, 2, 4, 8], channels: 1 },
  4: { depths: [8, 16], channels: 2 },
  6: { depths: [8, 16], channels: 4 },
};

/** Adam7 passes: first column and row, and the steps between them (PNG specification §8.2). */
const ADAM7 = [
  [0, 0, 8, 8],
  [4, 0, 8, 8],
  [0, 4, 4, 8],
  [2, 0, 4, 4],
  [0, 2, 2, 4],
  [1, 0, 2, 2],
  [0, 1, 1, 2],
] as const;

/**
 * zlib level of the image data written by encodePng: 3, what fast-png writes by default, so the files are byte for byte
 * those of the encoder used before. Rendered frames are written once per call and read back by tools, where a faster
 * write matters more than the few percent a higher level would save.
 */
const ZLIB_LEVEL = 3;

const zlib = nodeZlib();

/**
 * CRC-32 of bytes[start, end): Node's native one where there is one (the command line, the app's server), else the
 * core's own in JavaScript; both compute the same ISO/IEC 15948 CRC.
 */
const crc32: (bytes: Uint8Array, start: number, end: number) => number =
  zlib && typeof zlib.crc32 === "function" ? (bytes, start, end) => zlib.crc32(bytes.subarray(start, end)) : crc32Js;

const u32 = (b: Uint8Array, at: number) => ((b[at] << 24) | (b[at + 1] << 16) | (b[at + 2] << 8) | b[at + 3]) >>> 0;

function chunkType(b: Uint8Array, at: number): string {
  return String.fromCharCode(b[at], b[at + 1], b[at + 2], b[at + 3]);
}

/** One chunk of a PNG: type, where its data starts, and its length; its CRC is checked. */
interface Chunk {
  readonly type: string;
  readonly data: number;
  readonly length: number;
}

/** Reads the chunk at byte `at`, or throws PngError when it runs past the end of the file or its CRC is wrong. */
function readChunk(bytes: Uint8Array, at: number): Chunk {
  if (at + 12 > bytes.length) throw new PngError(`truncated: the file ends at byte ${bytes.length}, inside the chunk header at byte ${at}`);
  const length = u32(bytes, at);
  const type = chunkType(bytes, at + 4);
  if (!/^[A-Za-z]{4}$/.test(type)) throw new PngError(`not a PNG chunk at byte ${at} (type bytes ${JSON.stringify(type)})`);
  if (length > bytes.length - at - 12)
    throw new PngError(`truncated: chunk ${type} at byte ${at} declares ${length} bytes, but only ${bytes.length - at - 12} follow`);
  if (crc32(bytes, at + 4, at + 8 + length) !== u32(bytes, at + 8 + length))
    throw new PngError(`chunk ${type} at byte ${at} has a bad CRC (the file is damaged)`);
  return { type, data: at + 8, length };
}

/**
 * Reads the signature and the IHDR chunk only (its CRC included): the size and colour type a PNG declares, so that a
 * caller can refuse a picture that is too large before decoding it. Throws PngError for bytes that are not a PNG.
 */
export function pngHeader(bytes: Uint8Array): PngHeader {
  if (!(bytes instanceof Uint8Array)) throw new PngError("not a readable PNG (expected bytes)");
  for (let i = 0; i < 8; i++)
    if (bytes[i] !== SIGNATURE[i])
      throw new PngError(
        bytes.length < 8 ? `not a readable PNG (${bytes.length} bytes, too short)` : "not a readable PNG (no PNG signature)",
      );
  const ihdr = readChunk(bytes, 8);
  if (ihdr.type !== "IHDR" || ihdr.length !== 13) throw new PngError(`not a readable PNG (the first chunk is ${ihdr.type}, not IHDR)`);
  const at = ihdr.data;
  const width = u32(bytes, at);
  const height = u32(bytes, at + 4);
  const bitDepth = bytes[at + 8];
  const colorType = bytes[at + 9];
  if (width < 1 || height < 1 || width > 0x7fffffff || height > 0x7fffffff)
    throw new PngError(`IHDR: ${width}×${height} pixels is not allowed; width and height must be 1 to 2^31 − 1`);
  const type = COLOR_TYPES[colorType];
  if (!type) throw new PngError(`IHDR: colour type ${colorType} is not allowed; allowed 0, 2, 3, 4 or 6`);
  if (!type.depths.includes(bitDepth))
    throw new PngError(`IHDR: bit depth ${bitDepth} is not allowed for colour type ${colorType}; allowed ${type.depths.join(", ")}`);
  if (bytes[at + 10] !== 0) throw new PngError(`IHDR: compression method ${bytes[at + 10]} is not allowed; allowed 0 (deflate)`);
  if (bytes[at + 11] !== 0) throw new PngError(`IHDR: filter method ${bytes[at + 11]} is not allowed; allowed 0`);
  if (bytes[at + 12] > 1) throw new PngError(`IHDR: interlace method ${bytes[at + 12]} is not allowed; allowed 0 (none) or 1 (Adam7)`);
  return {
    width,
    height,
    bitDepth,
    colorType: colorType as PngHeader["colorType"],
    interlaced: bytes[at + 12] === 1,
    kind: colorType === 3 ? "indexed" : "rgba",
  };
}

/** Bytes of one filtered scanline of `width` pixels (without its filter byte). */
const lineBytes = (width: number, bitsPerPixel: number) => Math.ceil((width * bitsPerPixel) / 8);

/** The sub-images the image data holds: the whole image, or the seven Adam7 passes (empty ones left out). */
function subImages(h: PngHeader): { x0: number; y0: number; dx: number; dy: number; width: number; height: number }[] {
  if (!h.interlaced) return [{ x0: 0, y0: 0, dx: 1, dy: 1, width: h.width, height: h.height }];
  return ADAM7.map(([x0, y0, dx, dy]) => ({
    x0,
    y0,
    dx,
    dy,
    width: Math.ceil((h.width - x0) / dx),
    height: Math.ceil((h.height - y0) / dy),
  })).filter((p) => p.width > 0 && p.height > 0);
}

/**
 * Undoes the scanline filters of one sub-image in place (PNG specification §9): `rows` lines of `stride` bytes, each
 * after a filter byte, starting at `start`; `bpp` is the bytes per complete pixel, at least 1. Returns the next line.
 * Hot loop: one pass over the bytes, no allocation.
 */
function unfilter(raw: Uint8Array, start: number, rows: number, stride: number, bpp: number): number {
  let line = start;
  for (let r = 0; r < rows; r++, line += stride + 1) {
    const filter = raw[line];
    const x = line + 1;
    const up = x - stride - 1; // the line above, already unfiltered; none for r = 0
    const end = x + stride;
    switch (filter) {
      case 0:
        break;
      case 1:
        for (let i = x + bpp; i < end; i++) raw[i] += raw[i - bpp];
        break;
      case 2:
        if (r > 0) for (let i = x, u = up; i < end; i++, u++) raw[i] += raw[u];
        break;
      case 3:
        if (r > 0) {
          for (let i = x, u = up; i < x + bpp; i++, u++) raw[i] += raw[u] >> 1;
          for (let i = x + bpp, u = up + bpp; i < end; i++, u++) raw[i] += (raw[i - bpp] + raw[u]) >> 1;
        } else for (let i = x + bpp; i < end; i++) raw[i] += raw[i - bpp] >> 1;
        break;
      case 4:
        if (r > 0) {
          for (let i = x, u = up; i < x + bpp; i++, u++) raw[i] += raw[u];
          for (let i = x + bpp, u = up + bpp; i < end; i++, u++) {
            const a = raw[i - bpp];
            const b = raw[u];
            const c = raw[u - bpp];
            const p = a + b - c;
            const pa = p > a ? p - a : a - p;
            const pb = p > b ? p - b : b - p;
            const pc = p > c ? p - c : c - p;
            raw[i] += pa <= pb && pa <= pc ? a : pb <= pc ? b : c;
          }
        } else for (let i = x + bpp; i < end; i++) raw[i] += raw[i - bpp];
        break;
      default:
        throw new PngError(`image data: scanline ${r} uses filter type ${filter}; allowed 0 to 4`);
    }
  }
  return line;
}

let to8From16: Uint8Array | undefined;

/** 16-bit sample → 8 bits, Math.round(v / 257): the nearest 8-bit value (PNG specification §13.12), as a table built once. */
function table16(): Uint8Array {
  if (!to8From16) {
    to8From16 = new Uint8Array(65536);
    for (let v = 0; v < 65536; v++) to8From16[v] = Math.round(v * (1 / 257));
  }
  return to8From16;
}

/** Samples of 1, 2, 4 or 8 bits scaled to 8: v·255/(2^depth − 1), rounded (PNG specification §13.12). */
function tableLow(depth: number): Uint8Array {
  const max = (1 << depth) - 1;
  const scale = 255 / max;
  return Uint8Array.from({ length: max + 1 }, (_, v) => Math.round(v * scale));
}

/** The palette of a colour-type-3 PNG: PLTE entries with their tRNS alpha (255 where tRNS has none). */
function readPalette(bytes: Uint8Array, plte: Chunk | undefined, trns: Chunk | undefined): Rgba[] {
  if (!plte) throw new PngError("PLTE: missing; a palette PNG (colour type 3) needs one");
  const n = plte.length / 3;
  if (trns && trns.length > n) throw new PngError(`tRNS: ${trns.length} alpha values for a palette of ${n} colours; allowed at most ${n}`);
  const palette: Rgba[] = [];
  for (let i = 0; i < n; i++) {
    const at = plte.data + 3 * i;
    palette.push([bytes[at], bytes[at + 1], bytes[at + 2], trns && i < trns.length ? bytes[trns.data + i] : 255]);
  }
  return palette;
}

/**
 * Reads a PNG: a palette PNG stays indexed (indices unpacked to one byte per pixel, palette with alpha from tRNS),
 * anything else becomes 8-bit RGBA (16-bit samples rounded to 8 bits, low-depth greys scaled, tRNS colour keys made
 * transparent).
 *
 * Hostile files are refused with a PngError before the image data is inflated: bytes that are not a PNG, a truncated
 * file, a bad CRC in any chunk, a declared size beyond the core's canvas limit (4096 pixels a side). The image data is
 * then inflated into exactly the bytes the declared size needs, a piece at a time, so a decompression bomb stops there.
 */
export function decodePng(bytes: Uint8Array): Image {
  return decode(bytes, false);
}

/**
 * decodePng as it runs where there is no Node zlib (a browser): the image data inflated by fflate in JavaScript. The
 * same pictures and the same refusals; here so that tests and benchmarks on Node reach that path too.
 */
export function decodePngInJs(bytes: Uint8Array): Image {
  return decode(bytes, true);
}

function decode(bytes: Uint8Array, js: boolean): Image {
  const header = pngHeader(bytes);
  const { width, height, bitDepth: depth, colorType } = header;
  const max = LIMITS.canvas.max;
  if (width > max || height > max)
    throw new PngError(`the PNG is ${width}×${height} pixels; allowed at most ${max}×${max} (the canvas limit)`);

  let plte: Chunk | undefined;
  let trns: Chunk | undefined;
  const idat: Chunk[] = [];
  let at = 8 + 25;
  for (;;) {
    const chunk = readChunk(bytes, at);
    at = chunk.data + chunk.length + 4;
    if (chunk.type === "IEND") break;
    if (chunk.type === "IHDR") throw new PngError("IHDR: appears twice");
    if (chunk.type === "IDAT") idat.push(chunk);
    else if (chunk.type === "PLTE" && colorType === 3) {
      if (plte) throw new PngError("PLTE: appears twice");
      if (idat.length) throw new PngError("PLTE: comes after the image data; it must come before");
      if (chunk.length % 3 !== 0 || chunk.length < 3 || chunk.length > 768)
        throw new PngError(`PLTE: ${chunk.length} bytes is not allowed; allowed 1 to 256 colours of 3 bytes each`);
      plte = chunk;
    } else if (chunk.type === "tRNS") {
      if (colorType === 4 || colorType === 6) throw new PngError(`tRNS: not allowed for colour type ${colorType}, which has alpha already`);
      if (colorType === 3 && !plte) throw new PngError("tRNS: comes before PLTE; it must come after");
      if (colorType !== 3 && chunk.length % 2 !== 0)
        throw new PngError(`tRNS: ${chunk.length} bytes is not allowed for colour type ${colorType}; allowed whole 16-bit values`);
      trns = chunk;
    }
  }
  if (idat.length === 0) throw new PngError("no image data (IDAT chunk)");

  const channels = COLOR_TYPES[colorType].channels;
  const bitsPerPixel = depth * channels;
  const bpp = Math.max(1, bitsPerPixel >> 3);
  const parts = subImages(header);
  const expected = parts.reduce((n, p) => n + p.height * (1 + lineBytes(p.width, bitsPerPixel)), 0);
  const palette = colorType === 3 ? readPalette(bytes, plte, trns) : null;
  const key = colourKey(bytes, trns, colorType);
  const raw = inflateImageData(
    idat.map(({ data, length }) => bytes.subarray(data, data + length)),
    expected,
    js,
  );

  const n = width * height;
  const perPixel = palette ? 1 : 4;
  // 8-bit palette or RGBA lines without interlacing are already the pixels, one filter byte apart: they close up in
  // place, and the picture keeps the inflated buffer instead of a fresh copy (on a 1920 × 1080 RGBA file, a new 8 MB
  // buffer costs more in first touches of its pages than the copy itself).
  if (!header.interlaced && depth === 8 && (colorType === 3 || colorType === 6)) {
    const stride = width * perPixel;
    unfilter(raw, 0, height, stride, bpp);
    for (let r = 0; r < height; r++) raw.copyWithin(r * stride, r * (stride + 1) + 1, (r + 1) * (stride + 1));
    const data = new Uint8Array(raw.buffer, raw.byteOffset, n * perPixel);
    return palette ? indexedImage(width, height, data, palette) : { kind: "rgba", width, height, data };
  }
  const out = new Uint8Array(n * perPixel);
  let line = 0;
  for (const p of parts) {
    const stride = lineBytes(p.width, bitsPerPixel);
    unfilter(raw, line, p.height, stride, bpp);
    for (let j = 0; j < p.height; j++, line += stride + 1) {
      const first = (p.y0 + j * p.dy) * width + p.x0;
      if (palette) writeIndices(raw, line + 1, p.width, depth, out, first, p.dx);
      else writeRgba(raw, line + 1, p.width, depth, colorType, key, out, first, p.dx);
    }
  }
  return palette ? indexedImage(width, height, out, palette) : { kind: "rgba", width, height, data: out };
}

/** The indexed image of `data`, once every index is checked against the palette. */
function indexedImage(width: number, height: number, data: Uint8Array, palette: Rgba[]): IndexedImage {
  for (let i = 0; i < data.length; i++)
    if (data[i] >= palette.length)
      throw new PngError(
        `pixel ${i % width},${Math.floor(i / width)} uses palette index ${data[i]}, but the palette has ${palette.length} colours`,
      );
  return { kind: "indexed", width, height, data, palette };
}

/** Palette indices of one scanline (`count` pixels from byte `s`) into `out` from pixel `d`, every `step` pixels. */
function writeIndices(raw: Uint8Array, s: number, count: number, depth: number, out: Uint8Array, d: number, step: number): void {
  if (depth === 8) {
    if (step === 1) out.set(raw.subarray(s, s + count), d);
    else for (let i = 0; i < count; i++, d += step) out[d] = raw[s + i];
    return;
  }
  const mask = (1 << depth) - 1;
  for (let i = 0, bit = 0; i < count; i++, bit += depth, d += step) out[d] = (raw[s + (bit >> 3)] >> (8 - depth - (bit & 7))) & mask;
}

/** A tRNS colour key as stored (one grey, or R, G, B, each as a 16-bit value), or −1s when there is none. */
function colourKey(bytes: Uint8Array, trns: Chunk | undefined, colorType: number): Int32Array {
  const key = new Int32Array([-1, -1, -1]);
  const n = colorType === 0 ? 1 : 3;
  if (trns && trns.length === 2 * n) for (let k = 0; k < n; k++) key[k] = (bytes[trns.data + 2 * k] << 8) | bytes[trns.data + 2 * k + 1];
  return key;
}

/**
 * One scanline of a non-palette PNG as 8-bit RGBA into `out` from pixel `d`, every `step` pixels. A tRNS colour key
 * (compared with the samples as stored, before any scaling) makes matching pixels fully transparent.
 */
function writeRgba(
  raw: Uint8Array,
  s: number,
  count: number,
  depth: number,
  colorType: number,
  key: Int32Array,
  out: Uint8Array,
  d: number,
  step: number,
): void {
  const o4 = 4 * step;
  let o = 4 * d;
  if (depth === 8 && colorType === 6) {
    if (step === 1) out.set(raw.subarray(s, s + 4 * count), o);
    else
      for (let i = 0; i < count; i++, o += o4, s += 4) {
        out[o] = raw[s];
        out[o + 1] = raw[s + 1];
        out[o + 2] = raw[s + 2];
        out[o + 3] = raw[s + 3];
      }
    return;
  }
  const [k0, k1, k2] = key;
  if (depth === 16) {
    const t = table16();
    switch (colorType) {
      case 0:
        for (let i = 0; i < count; i++, o += o4, s += 2) {
          const g = (raw[s] << 8) | raw[s + 1];
          out[o] = out[o + 1] = out[o + 2] = t[g];
          out[o + 3] = g === k0 ? 0 : 255;
        }
        return;
      case 2:
        for (let i = 0; i < count; i++, o += o4, s += 6) {
          const r = (raw[s] << 8) | raw[s + 1];
          const g = (raw[s + 2] << 8) | raw[s + 3];
          const b = (raw[s + 4] << 8) | raw[s + 5];
          out[o] = t[r];
          out[o + 1] = t[g];
          out[o + 2] = t[b];
          out[o + 3] = r === k0 && g === k1 && b === k2 ? 0 : 255;
        }
        return;
      case 4:
        for (let i = 0; i < count; i++, o += o4, s += 4) {
          out[o] = out[o + 1] = out[o + 2] = t[(raw[s] << 8) | raw[s + 1]];
          out[o + 3] = t[(raw[s + 2] << 8) | raw[s + 3]];
        }
        return;
      default:
        for (let i = 0; i < count; i++, o += o4, s += 8) {
          out[o] = t[(raw[s] << 8) | raw[s + 1]];
          out[o + 1] = t[(raw[s + 2] << 8) | raw[s + 3]];
          out[o + 2] = t[(raw[s + 4] << 8) | raw[s + 5]];
          out[o + 3] = t[(raw[s + 6] << 8) | raw[s + 7]];
        }
        return;
    }
  }
  switch (colorType) {
    case 0: {
      // Greyscale of 1, 2, 4 or 8 bits.
      const scale = tableLow(depth);
      const mask = (1 << depth) - 1;
      for (let i = 0, bit = 0; i < count; i++, bit += depth, o += o4) {
        const g = (raw[s + (bit >> 3)] >> (8 - depth - (bit & 7))) & mask;
        out[o] = out[o + 1] = out[o + 2] = scale[g];
        out[o + 3] = g === k0 ? 0 : 255;
      }
      return;
    }
    case 2:
      for (let i = 0; i < count; i++, o += o4, s += 3) {
        const r = raw[s];
        const g = raw[s + 1];
        const b = raw[s + 2];
        out[o] = r;
        out[o + 1] = g;
        out[o + 2] = b;
        out[o + 3] = r === k0 && g === k1 && b === k2 ? 0 : 255;
      }
      return;
    default:
      // Greyscale with alpha, 8 bits.
      for (let i = 0; i < count; i++, o += o4, s += 2) {
        out[o] = out[o + 1] = out[o + 2] = raw[s];
        out[o + 3] = raw[s + 1];
      }
  }
}

/** Appends one chunk (length, type, data, CRC) to `out` at byte `at`; returns the byte after it. */
function putChunk(out: Uint8Array, at: number, type: string, data: Uint8Array): number {
  const view = new DataView(out.buffer, out.byteOffset, out.byteLength);
  view.setUint32(at, data.length);
  for (let i = 0; i < 4; i++) out[at + 4 + i] = type.charCodeAt(i);
  out.set(data, at + 8);
  view.setUint32(at + 8 + data.length, crc32(out, at + 4, at + 8 + data.length));
  return at + 12 + data.length;
}

/**
 * Writes an image as PNG: indexed as an 8-bit palette PNG with its exact palette (and tRNS where needed, one alpha per
 * entry up to the last translucent one), RGBA as 8-bit RGBA; no interlacing, filter type 0 on every line.
 */
export function encodePng(image: Image): Uint8Array {
  const { width, height } = image;
  if (!Number.isInteger(width) || width < 1 || !Number.isInteger(height) || height < 1)
    throw new RangeError(`image: ${width}×${height} pixels is not allowed; width and height must be whole numbers from 1`);
  const indexed = image.kind === "indexed";
  const perPixel = indexed ? 1 : 4;
  if (image.data.length !== width * height * perPixel)
    throw new RangeError(
      `image data: ${image.data.length} bytes; a ${width}×${height} ${image.kind} image has ${width * height * perPixel}`,
    );
  let plte: Uint8Array | null = null;
  let trns: Uint8Array | null = null;
  if (indexed) {
    const img: IndexedImage = image;
    const n = img.palette.length;
    if (n < 1 || n > 256) throw new RangeError(`palette: ${n} colours; allowed 1 to 256`);
    for (let i = 0; i < img.data.length; i++)
      if (img.data[i] >= n)
        throw new RangeError(
          `pixel ${i % width},${Math.floor(i / width)}: palette index ${img.data[i]} is not allowed; allowed 0 to ${n - 1} (the palette has ${n} colours)`,
        );
    plte = new Uint8Array(3 * n);
    let last = -1;
    img.palette.forEach((c, i) => {
      plte!.set([c[0], c[1], c[2]], 3 * i);
      if (c[3] !== 255) last = i;
    });
    if (last >= 0) trns = Uint8Array.from(img.palette.slice(0, last + 1), (c) => c[3]);
  }

  // Scanlines with filter type 0 (none) before each: the same bytes fast-png deflates.
  const stride = width * perPixel;
  const raw = new Uint8Array(height * (stride + 1));
  for (let r = 0; r < height; r++) raw.set(image.data.subarray(r * stride, (r + 1) * stride), r * (stride + 1) + 1);
  const idat = zlibSync(raw, { level: ZLIB_LEVEL });

  const ihdr = new Uint8Array(13);
  const v = new DataView(ihdr.buffer);
  v.setUint32(0, width);
  v.setUint32(4, height);
  ihdr.set([8, indexed ? 3 : 6, 0, 0, 0], 8);
  const size = 8 + 25 + (plte ? 12 + plte.length : 0) + (trns ? 12 + trns.length : 0) + 12 + idat.length + 12;
  const out = new Uint8Array(size);
  out.set(SIGNATURE);
  let at = putChunk(out, 8, "IHDR", ihdr);
  if (plte) at = putChunk(out, at, "PLTE", plte);
  if (trns) at = putChunk(out, at, "tRNS", trns); // after PLTE, before IDAT (PNG specification §5.6)
  at = putChunk(out, at, "IDAT", idat);
  putChunk(out, at, "IEND", new Uint8Array(0));
  return out;
}
