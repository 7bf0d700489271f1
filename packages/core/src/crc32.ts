let crcTables: Uint32Array[] | undefined;

/** CRC-32 tables for slicing by 8, built on first use (ISO/IEC 15948 Annex D polynomial 0xEDB88320; slicing is common practice). */
function crcTable(): Uint32Array[] {
  if (crcTables) return crcTables;
  const t = Array.from({ length: 8 }, () => new Uint32Array(256));
  for (let n = 0; n < 256; n++) {
    let c = n;
    for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
    t[0][n] = c >>> 0;
  }
  for (let n = 0; n < 256; n++) for (let k = 1; k < 8; k++) t[k][n] = (t[0][t[k - 1][n] & 0xff] ^ (t[k - 1][n] >>> 8)) >>> 0;
  crcTables = t;
  return t;
}

/** CRC-32 of bytes[start, end) (default: all of them), as PNG chunks and zip entries carry it. */
export function crc32(bytes: Uint8Array, start = 0, end = bytes.length): number {
  const [t0, t1, t2, t3, t4, t5, t6, t7] = crcTable();
  let c = 0xffffffff;
  let i = start;
  for (; i + 8 <= end; i += 8) {
    const a = c ^ (bytes[i] | (bytes[i + 1] << 8) | (bytes[i + 2] << 16) | (bytes[i + 3] << 24));
    c =
      t7[a & 0xff] ^
      t6[(a >>> 8) & 0xff] ^
      t5[(a >>> 16) & 0xff] ^
      t4[a >>> 24] ^
      t3[bytes[i + 4]] ^
      t2[bytes[i + 5]] ^
      t1[bytes[i + 6]] ^
      t0[bytes[i + 7]];
  }
  for (; i < end; i++) c = t0[(c ^ bytes[i]) & 0xff] ^ (c >>> 8);
  return (c ^ 0xffffffff) >>> 0;
}
