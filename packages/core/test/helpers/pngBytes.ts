import { crc32, deflateSync } from "node:zlib";

/**
 * Writes a PNG by hand from the PNG specification (W3C / ISO/IEC 15948): signature, IHDR, optional PLTE and tRNS,
 * one IDAT of filter-0 scanlines packed most significant bits first, IEND. CRCs and deflate come from node:zlib.
 */
export function pngBytes(options: {
  width: number;
  height: number;
  depth: 1 | 2 | 4 | 8 | 16;
  /** 0 grey, 2 RGB, 3 palette, 4 grey + alpha, 6 RGBA. */
  colorType: 0 | 2 | 3 | 4 | 6;
  /** Samples row-major, `channels` per pixel. */
  samples: readonly number[];
  palette?: readonly (readonly [number, number, number])[];
  trns?: readonly number[];
}): Uint8Array {
  const { width, height, depth, colorType, samples } = options;
  const channels = { 0: 1, 2: 3, 3: 1, 4: 2, 6: 4 }[colorType];
  const chunk = (type: string, body: Uint8Array) => {
    const out = Buffer.alloc(12 + body.length);
    out.writeUInt32BE(body.length, 0);
    out.write(type, 4, "latin1");
    Buffer.from(body).copy(out, 8);
    out.writeUInt32BE(crc32(out.subarray(4, 8 + body.length)), 8 + body.length);
    return out;
  };
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(width, 0);
  ihdr.writeUInt32BE(height, 4);
  ihdr.set([depth, colorType, 0, 0, 0], 8);
  const rowBytes = Math.ceil((width * channels * depth) / 8);
  const raw = Buffer.alloc(height * (1 + rowBytes));
  for (let r = 0; r < height; r++) {
    const o = r * (1 + rowBytes) + 1; // filter byte 0 (None) before each row
    for (let i = 0; i < width * channels; i++) {
      const s = samples[r * width * channels + i];
      if (depth === 16) raw.writeUInt16BE(s, o + 2 * i);
      else if (depth === 8) raw[o + i] = s;
      else {
        const bit = i * depth;
        raw[o + (bit >> 3)] |= s << (8 - depth - (bit & 7));
      }
    }
  }
  const parts = [Buffer.from([137, 80, 78, 71, 13, 10, 26, 10]), chunk("IHDR", ihdr)];
  if (options.palette) parts.push(chunk("PLTE", Uint8Array.from(options.palette.flat())));
  if (options.trns) {
    const t = colorType === 3 ? Uint8Array.from(options.trns) : Buffer.alloc(2 * options.trns.length);
    if (colorType !== 3) options.trns.forEach((v, i) => (t as Buffer).writeUInt16BE(v, 2 * i));
    parts.push(chunk("tRNS", t));
  }
  parts.push(chunk("IDAT", deflateSync(raw)), chunk("IEND", new Uint8Array(0)));
  return new Uint8Array(Buffer.concat(parts));
}

/** The chunk types of a PNG in file order, with their body lengths. */
export function pngChunks(png: Uint8Array): { type: string; length: number; body: Uint8Array }[] {
  const b = Buffer.from(png.buffer, png.byteOffset, png.byteLength);
  const out: { type: string; length: number; body: Uint8Array }[] = [];
  for (let at = 8; at < b.length;) {
    const length = b.readUInt32BE(at);
    out.push({ type: b.toString("latin1", at + 4, at + 8), length, body: png.subarray(at + 8, at + 8 + length) });
    // Every chunk's CRC covers its type and body (PNG specification §5.3).
    if (b.readUInt32BE(at + 8 + length) !== crc32(b.subarray(at + 4, at + 8 + length))) throw new Error(`bad CRC in ${out.at(-1)!.type}`);
    at += 12 + length;
  }
  return out;
}
