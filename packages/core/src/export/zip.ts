import { Zip, deflateSync, type ZipInputFile } from "fflate";
import { crc32 } from "../crc32.ts";
import { nodeZlib } from "../nodeZlib.ts";

/**
 * Deflate level of every bundle's zip: 1. A bundle is text tables that a build unpacks right away or a person downloads
 * once (the API answers 304 while nothing changed); level 1 already shrinks them about sixteenfold, and level 6 halves
 * that again for three times the time (Node's zlib on a 4096-frame 320 × 240 bundle: 5.8 MB in 0.13 s against 2.6 MB in
 * 0.42 s; fflate in JavaScript takes six times as long at either level).
 */
const ZIP_LEVEL = 1;

/** How the zip's entries are compressed: raw deflate (RFC 1951) and the CRC-32 of the uncompressed bytes. */
export interface ZipCodec {
  readonly deflateRaw: (bytes: Uint8Array) => Uint8Array;
  readonly crc32: (bytes: Uint8Array) => number;
}

/** Deflate in JavaScript, for a platform without Node's zlib. */
export const FFLATE_ZIP_CODEC: ZipCodec = {
  deflateRaw: (bytes) => deflateSync(bytes, { level: ZIP_LEVEL }),
  crc32: (bytes) => crc32(bytes),
};

let codec: ZipCodec | undefined;

/**
 * Node's own zlib (native code, six times faster than deflate in JavaScript) where there is one: the command line and the
 * app's server, which therefore write the very same zip for the same bundle; fflate elsewhere (a browser).
 */
function zipCodec(): ZipCodec {
  if (codec) return codec;
  const zlib = nodeZlib();
  codec = zlib
    ? { deflateRaw: (bytes) => zlib.deflateRawSync(bytes, { level: ZIP_LEVEL }), crc32: (bytes) => zlib.crc32(bytes) }
    : FFLATE_ZIP_CODEC;
  return codec;
}

/** A text file's content as pieces to join with `separator`: a zip encodes it from them without joining them first. */
export interface TextPieces {
  readonly pieces: readonly string[];
  readonly separator: string;
}

/** One file to zip: its name and bytes, or its text as pieces (then its bytes are not read). */
export interface ZipSource {
  readonly name: string;
  readonly bytes: Uint8Array;
  readonly pieces?: TextPieces;
}

/** UTF-16 code units of a text given as pieces; its UTF-8 takes at most three bytes for each. */
function codeUnits({ pieces, separator }: TextPieces): number {
  let n = separator.length * Math.max(0, pieces.length - 1);
  for (const p of pieces) n += p.length;
  return n;
}

/**
 * A zip archive of the files, in order, deflated at level 1 and dated `mtime`, so that the same files give the same
 * bytes; the container is fflate's (local headers with data descriptors, then the central directory).
 *
 * A text given as pieces is encoded (UTF-8, as TextEncoder does) into one buffer that every such file reuses, then
 * checksummed and deflated from there: on a machine that pays dearly for fresh memory pages, encoding 90 MB of text
 * into new arrays cost more than deflating it (bench/cli.bench.ts).
 */
export function zipArchive(files: readonly ZipSource[], mtime: Date, using: ZipCodec = zipCodec()): Uint8Array {
  const { deflateRaw, crc32: crc } = using;
  const encode = piecesEncoder(files, 1)[0];
  const entries = files.map((f) => {
    const bytes = f.pieces ? encode(f.pieces) : f.bytes;
    return { name: f.name, size: bytes.length, crc: crc(bytes), deflated: deflateRaw(bytes) };
  });
  return container(entries, mtime);
}

/**
 * zipArchive with Node's zlib deflating on its thread pool, two files at a time, while this thread encodes the next:
 * the very same bytes (the same deflate, level and input), sooner on a machine with a core to spare. Where there is no
 * Node zlib it is zipArchive.
 */
export async function zipArchiveAsync(files: readonly ZipSource[], mtime: Date): Promise<Uint8Array> {
  const zlib = nodeZlib();
  if (zlib === undefined) return zipArchive(files, mtime);
  const deflate = (bytes: Uint8Array) =>
    new Promise<Uint8Array>((resolve, reject) =>
      zlib.deflateRaw(bytes, { level: ZIP_LEVEL }, (error, out) => (error ? reject(error) : resolve(out))),
    );
  const SLOTS = 2;
  const encoders = piecesEncoder(files, SLOTS);
  const busy: Promise<unknown>[] = [];
  const pending: Promise<{ name: string; size: number; crc: number; deflated: Uint8Array }>[] = [];
  for (let i = 0; i < files.length; i++) {
    const f = files[i];
    const slot = i % SLOTS;
    // A slot's buffer is written again only once the deflate reading it has finished.
    if (f.pieces) await busy[slot];
    const bytes = f.pieces ? encoders[slot](f.pieces) : f.bytes;
    const size = bytes.length;
    const crc = zlib.crc32(bytes);
    const deflated = deflate(bytes);
    if (f.pieces) busy[slot] = deflated.catch(() => undefined);
    pending.push(deflated.then((d) => ({ name: f.name, size, crc, deflated: d })));
  }
  return container(await Promise.all(pending), mtime);
}

/**
 * `count` encoders of texts given as pieces, each writing into a buffer of its own (made once, large enough for the
 * largest such file) and returning a view of it, valid until its next call.
 */
function piecesEncoder(files: readonly ZipSource[], count: number): ((text: TextPieces) => Uint8Array)[] {
  let largest = 0;
  for (const f of files) if (f.pieces) largest = Math.max(largest, codeUnits(f.pieces));
  const encoder = new TextEncoder();
  return Array.from({ length: count }, () => {
    let scratch: Uint8Array | undefined;
    return ({ pieces, separator }: TextPieces): Uint8Array => {
      scratch ??= new Uint8Array(largest * 3);
      let at = 0;
      for (let i = 0; i < pieces.length; i++) {
        if (i > 0) at += encoder.encodeInto(separator, scratch.subarray(at)).written;
        at += encoder.encodeInto(pieces[i], scratch.subarray(at)).written;
      }
      return scratch.subarray(0, at);
    };
  });
}

/** The zip container (fflate's: local headers with data descriptors, then the central directory) of deflated entries. */
function container(
  entries: readonly { readonly name: string; readonly size: number; readonly crc: number; readonly deflated: Uint8Array }[],
  mtime: Date,
): Uint8Array {
  const chunks: Uint8Array[] = [];
  let failure: Error | null = null;
  const zip = new Zip((error, data) => {
    if (error) failure = error;
    else chunks.push(data);
  });
  for (const e of entries) {
    const input: ZipInputFile = { filename: e.name, size: e.size, crc: e.crc, compression: 8, mtime };
    zip.add(input);
    input.ondata!(null, e.deflated as Uint8Array<ArrayBuffer>, true);
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
