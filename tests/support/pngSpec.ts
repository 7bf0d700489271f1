/**
 * A tiny PNG reader and writer written straight from the PNG specification (W3C, "Portable Network
 * Graphics (PNG) Specification", chunks in §5 and §11, filters in §9), using only Node's zlib.
 * It exists to check fast-png from the outside; it is not used by the app.
 */
import { crc32, deflateSync, inflateSync } from "node:zlib";

/** The 8-byte PNG signature (§5.2). */
export const SIGNATURE = Buffer.from([137, 80, 78, 71, 13, 10, 26, 10]);

export interface Chunk {
  type: string;
  data: Buffer;
  crcOk: boolean;
}

/** Splits a PNG file into its chunks, checking each CRC (§5.3: CRC-32 over type and data). */
export function readChunks(file: Uint8Array): Chunk[] {
  const buf = Buffer.from(file);
  if (!buf.subarray(0, 8).equals(SIGNATURE)) throw new Error("not a PNG signature");
  const chunks: Chunk[] = [];
  let at = 8;
  while (at < buf.length) {
    const length = buf.readUInt32BE(at);
    const type = buf.toString("latin1", at + 4, at + 8);
    const data = buf.subarray(at + 8, at + 8 + length);
    const crc = buf.readUInt32BE(at + 8 + length);
    chunks.push({ type, data, crcOk: crc32(buf.subarray(at + 4, at + 8 + length)) === crc });
    at += 12 + length;
  }
  return chunks;
}

function paeth(a: number, b: number, c: number): number {
  const p = a + b - c;
  const pa = Math.abs(p - a);
  const pb = Math.abs(p - b);
  const pc = Math.abs(p - c);
  return pa <= pb && pa <= pc ? a : pb <= pc ? b : c;
}

/** Decodes a non-interlaced, 8-bit indexed PNG (colour type 3) into indices, palette and tRNS alphas. */
export function readIndexed(file: Uint8Array): { width: number; height: number; indices: Uint8Array; plte: number[][]; trns: number[] } {
  const chunks = readChunks(file);
  const ihdr = chunks.find((c) => c.type === "IHDR")!.data;
  const width = ihdr.readUInt32BE(0);
  const height = ihdr.readUInt32BE(4);
  const [depth, colourType, , , interlace] = [ihdr[8], ihdr[9], ihdr[10], ihdr[11], ihdr[12]];
  if (depth !== 8 || colourType !== 3 || interlace !== 0)
    throw new Error(`unsupported: depth ${depth}, colour type ${colourType}, interlace ${interlace}`);
  const plteData = chunks.find((c) => c.type === "PLTE")!.data;
  const plte: number[][] = [];
  for (let i = 0; i < plteData.length; i += 3) plte.push([plteData[i], plteData[i + 1], plteData[i + 2]]);
  const trns = [...(chunks.find((c) => c.type === "tRNS")?.data ?? [])];
  const raw = inflateSync(Buffer.concat(chunks.filter((c) => c.type === "IDAT").map((c) => c.data)));
  const indices = new Uint8Array(width * height);
  let prev = new Uint8Array(width);
  for (let y = 0; y < height; y++) {
    const filter = raw[y * (width + 1)];
    const line = raw.subarray(y * (width + 1) + 1, (y + 1) * (width + 1));
    const out = new Uint8Array(width);
    for (let x = 0; x < width; x++) {
      const a = x > 0 ? out[x - 1] : 0;
      const b = prev[x];
      const c = x > 0 ? prev[x - 1] : 0;
      const predictor = [0, a, b, (a + b) >> 1, paeth(a, b, c)][filter];
      if (predictor === undefined) throw new Error(`bad filter type ${filter}`);
      out[x] = (line[x] + predictor) & 0xff;
    }
    indices.set(out, y * width);
    prev = out;
  }
  return { width, height, indices, plte, trns };
}

/** One chunk: length, type, data and the CRC-32 over type and data (§5.3). */
export function chunk(type: string, data: Buffer): Buffer {
  const head = Buffer.alloc(8);
  head.writeUInt32BE(data.length, 0);
  head.write(type, 4, "latin1");
  const crc = Buffer.alloc(4);
  crc.writeUInt32BE(crc32(Buffer.concat([head.subarray(4), data])));
  return Buffer.concat([head, data, crc]);
}

/** Writes an indexed PNG of 1, 2, 4 or 8 bits per pixel, filter type 0 on every row (§9.2). */
export function writeIndexed(
  width: number,
  height: number,
  depth: 1 | 2 | 4 | 8,
  indices: number[],
  plte: number[][],
  trns?: number[],
): Buffer {
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(width, 0);
  ihdr.writeUInt32BE(height, 4);
  ihdr[8] = depth;
  ihdr[9] = 3;
  const rowBytes = Math.ceil((width * depth) / 8);
  const raw = Buffer.alloc(height * (rowBytes + 1));
  for (let y = 0; y < height; y++)
    for (let x = 0; x < width; x++) {
      const bit = x * depth;
      const byte = y * (rowBytes + 1) + 1 + (bit >> 3);
      raw[byte] |= indices[y * width + x] << (8 - depth - (bit & 7));
    }
  return Buffer.concat([
    SIGNATURE,
    chunk("IHDR", ihdr),
    chunk("PLTE", Buffer.from(plte.flat())),
    ...(trns ? [chunk("tRNS", Buffer.from(trns))] : []),
    chunk("IDAT", deflateSync(raw)),
    chunk("IEND", Buffer.alloc(0)),
  ]);
}

/** The 13 data bytes of an IHDR chunk (§11.2.2), with any values a test wants, allowed or not. */
export function ihdr(h: { width: number; height: number; depth?: number; colourType?: number; interlace?: number }): Buffer {
  const data = Buffer.alloc(13);
  data.writeUInt32BE(h.width, 0);
  data.writeUInt32BE(h.height, 4);
  data[8] = h.depth ?? 8;
  data[9] = h.colourType ?? 6;
  data[12] = h.interlace ?? 0;
  return data;
}

/** A PNG file from an IHDR, the filtered image data (deflated here into one IDAT) and optional chunks before it. */
export function pngFile(header: Buffer, raw: Buffer, before: Buffer[] = []): Buffer {
  return Buffer.concat([SIGNATURE, chunk("IHDR", header), ...before, chunk("IDAT", deflateSync(raw)), chunk("IEND", Buffer.alloc(0))]);
}

/** Writes an 8-bit RGBA PNG (colour type 6), filter type 0 on every row (§9.2). */
export function writeRgba(width: number, height: number, rgba: Uint8Array): Buffer {
  const raw = Buffer.alloc(height * (width * 4 + 1));
  for (let y = 0; y < height; y++) raw.set(rgba.subarray(y * width * 4, (y + 1) * width * 4), y * (width * 4 + 1) + 1);
  return pngFile(ihdr({ width, height }), raw);
}
