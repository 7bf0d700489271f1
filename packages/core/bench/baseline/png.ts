// Today's PNG reader and writer before the speed-up, kept as the baseline bench/png.bench.ts measures against (not used by the core).
import { decode, encode } from "fast-png";
import type { Image, IndexedImage, Rgba } from "../../src/image.ts";

/** Thrown when bytes are not a PNG the core can read; the message says what was found. */
export class PngError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "PngError";
  }
}

function unpack(packed: ArrayLike<number>, width: number, height: number, depth: number): Uint8Array {
  if (depth === 8) return Uint8Array.from(packed);
  const out = new Uint8Array(width * height);
  const perByte = 8 / depth;
  const stride = Math.ceil(width / perByte);
  const maskBits = (1 << depth) - 1;
  for (let r = 0; r < height; r++)
    for (let c = 0; c < width; c++) {
      const byte = packed[r * stride + Math.floor(c / perByte)];
      const shiftBits = 8 - depth * ((c % perByte) + 1);
      out[r * width + c] = (byte >> shiftBits) & maskBits;
    }
  return out;
}

/**
 * Reads a PNG: a palette PNG stays indexed (indices unpacked to one byte per pixel, palette with alpha from tRNS),
 * anything else becomes 8-bit RGBA.
 */
export function decodePng(bytes: Uint8Array): Image {
  let png: ReturnType<typeof decode>;
  try {
    png = decode(bytes);
  } catch (error) {
    throw new PngError(`not a readable PNG (${error instanceof Error ? error.message : String(error)})`);
  }
  const { width, height, depth, channels } = png;
  if (png.palette) {
    const palette: Rgba[] = png.palette.map((c) => [c[0], c[1], c[2], c.length > 3 ? c[3] : 255] as const);
    const data = unpack(png.data, width, height, depth);
    for (let i = 0; i < data.length; i++)
      if (data[i] >= palette.length)
        throw new PngError(
          `pixel ${i % width},${Math.floor(i / width)} uses palette index ${data[i]}, but the palette has ${palette.length} colours`,
        );
    return { kind: "indexed", width, height, data, palette };
  }
  const n = width * height;
  const out = new Uint8Array(n * 4);
  const src = png.data;
  const scale = depth === 16 ? 1 / 257 : depth < 8 ? 255 / ((1 << depth) - 1) : 1;
  const samples = depth < 8 ? unpack(src, width * channels, height, depth) : src;
  const tr = png.transparency;
  for (let i = 0; i < n; i++) {
    const s = i * channels;
    const raw = (k: number) => samples[s + k];
    const v = (k: number) => Math.round(raw(k) * scale);
    let r: number, g: number, b: number, a: number;
    if (channels === 1 || channels === 2) {
      r = g = b = v(0);
      a = channels === 2 ? v(1) : tr && tr.length === 1 && raw(0) === tr[0] ? 0 : 255;
    } else {
      r = v(0);
      g = v(1);
      b = v(2);
      a = channels === 4 ? v(3) : tr && tr.length === 3 && raw(0) === tr[0] && raw(1) === tr[1] && raw(2) === tr[2] ? 0 : 255;
    }
    out.set([r, g, b, a], i * 4);
  }
  return { kind: "rgba", width, height, data: out };
}

const CRC_TABLE = (() => {
  // CRC-32 of the PNG specification (ISO/IEC 15948, Annex D), polynomial 0xEDB88320.
  const table = new Uint32Array(256);
  for (let n = 0; n < 256; n++) {
    let c = n;
    for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
    table[n] = c >>> 0;
  }
  return table;
})();

function crc32(bytes: Uint8Array): number {
  let c = 0xffffffff;
  for (const b of bytes) c = CRC_TABLE[(c ^ b) & 0xff] ^ (c >>> 8);
  return (c ^ 0xffffffff) >>> 0;
}

/**
 * Rewrites the tRNS chunk of an encoded palette PNG so that entry i holds palette[i]'s alpha for every entry up to
 * the last translucent one. fast-png writes only the translucent alphas, which is right only when they come first.
 */
function fixTransparency(png: Uint8Array, palette: readonly Rgba[]): Uint8Array {
  let last = -1;
  palette.forEach((c, i) => {
    if (c[3] !== 255) last = i;
  });
  const view = new DataView(png.buffer, png.byteOffset, png.byteLength);
  const chunks: Uint8Array[] = [png.subarray(0, 8)];
  let trns: Uint8Array | undefined;
  if (last >= 0) {
    const body = new Uint8Array(4 + last + 1);
    body.set([0x74, 0x52, 0x4e, 0x53]); // "tRNS"
    for (let i = 0; i <= last; i++) body[4 + i] = palette[i][3];
    trns = new Uint8Array(12 + last + 1);
    new DataView(trns.buffer).setUint32(0, last + 1);
    trns.set(body, 4);
    new DataView(trns.buffer).setUint32(8 + last + 1, crc32(body));
  }
  for (let at = 8; at < png.length;) {
    const length = view.getUint32(at);
    const type = String.fromCharCode(...png.subarray(at + 4, at + 8));
    const chunk = png.subarray(at, at + 12 + length);
    at += 12 + length;
    if (type === "tRNS") continue;
    chunks.push(chunk);
    if (type === "PLTE" && trns) chunks.push(trns); // tRNS must follow PLTE and precede IDAT
  }
  const out = new Uint8Array(chunks.reduce((n, c) => n + c.length, 0));
  let o = 0;
  for (const c of chunks) {
    out.set(c, o);
    o += c.length;
  }
  return out;
}

/** Writes an image as PNG: indexed as an 8-bit palette PNG with its exact palette (and tRNS where needed), RGBA as 8-bit RGBA. */
export function encodePng(image: Image): Uint8Array {
  if (image.kind === "rgba") return encode({ width: image.width, height: image.height, data: image.data, channels: 4, depth: 8 });
  const img: IndexedImage = image;
  if (img.palette.length < 1 || img.palette.length > 256) throw new RangeError(`palette: ${img.palette.length} colours; allowed 1 to 256`);
  for (let i = 0; i < img.data.length; i++)
    if (img.data[i] >= img.palette.length)
      throw new RangeError(
        `pixel ${i % img.width},${Math.floor(i / img.width)}: palette index ${img.data[i]} is not allowed; allowed 0 to ${img.palette.length - 1} (the palette has ${img.palette.length} colours)`,
      );
  const palette = img.palette.map((c) => [c[0], c[1], c[2], c[3]]);
  const png = encode({ width: img.width, height: img.height, data: img.data, channels: 1, depth: 8, palette });
  return fixTransparency(png, img.palette);
}
