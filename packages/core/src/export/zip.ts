import { Zip, type ZipInputFile } from "fflate";

/** How a zip's entries are compressed: raw deflate (RFC 1951) and the CRC-32 of the uncompressed bytes. */
export interface ZipCodec {
  readonly deflateRaw: (bytes: Uint8Array) => Uint8Array;
  readonly crc32: (bytes: Uint8Array) => number;
}

/**
 * A zip archive of the files, in order, each deflated by `codec`, dated `mtime`; the container is fflate's (local headers
 * with data descriptors, central directory), the compression the codec's, so a caller with a faster deflate (Node's zlib)
 * can use it.
 */
export function zipArchive(
  files: readonly { readonly name: string; readonly bytes: Uint8Array }[],
  codec: ZipCodec,
  mtime: Date,
): Uint8Array {
  const chunks: Uint8Array[] = [];
  let failure: Error | null = null;
  const zip = new Zip((error, data) => {
    if (error) failure = error;
    else chunks.push(data);
  });
  for (const f of files) {
    const input: ZipInputFile = { filename: f.name, size: f.bytes.length, crc: codec.crc32(f.bytes), compression: 8, mtime };
    zip.add(input);
    input.ondata!(null, codec.deflateRaw(f.bytes) as Uint8Array<ArrayBuffer>, true);
  }
  zip.end();
  if (failure) throw failure;
  const out = new Uint8Array(chunks.reduce((n, c) => n + c.length, 0));
  let at = 0;
  for (const c of chunks) {
    out.set(c, at);
    at += c.length;
  }
  return out;
}
