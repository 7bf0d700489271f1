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

/** One deflated file of a zip: its name, size and CRC-32 before deflating, and its raw deflate stream. */
interface ZipEntry {
  readonly name: string;
  readonly size: number;
  readonly crc: number;
  readonly deflated: Uint8Array;
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
  const pending: Promise<ZipEntry>[] = [];
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

/** Files handed to a zip one by one as they are made, each deflated as soon as it can be; `finish` gives the archive. */
export interface ZipWriter {
  /**
   * Takes the archive's file number `index` (numbers from 0, each once, in any order). Returns undefined when the file
   * is on its way, or a promise when it must wait for a buffer: the file is taken once that settles, and the next `add`
   * waits for it.
   */
  add(index: number, file: ZipSource): Promise<void> | undefined;
  /** The archive of every file added, in index order: the same bytes as zipArchive of them. */
  finish(): Promise<Uint8Array>;
}

/**
 * A ZipWriter whose files go to Node's zlib on its thread pool as soon as they are added, while the caller goes on
 * making the next (and a long track's diagnostics run meanwhile): the very same bytes as zipArchive. Texts given as
 * pieces are encoded into two buffers in turn, each written again only once the deflate reading it has finished (on a
 * machine that pays dearly for fresh memory pages, a buffer per file cost more than the overlap saved). Where there is
 * no Node zlib, the files wait for `finish` and zipArchive.
 */
export function zipWriter(mtime: Date): ZipWriter {
  const zlib = nodeZlib();
  const sources: ZipSource[] = [];
  const take = (index: number, file: ZipSource) => {
    if (!Number.isInteger(index) || index < 0 || sources[index] !== undefined)
      throw new RangeError(`zip: file number ${index} is not allowed; allowed a whole number from 0, each once`);
    sources[index] = file;
  };
  if (zlib === undefined)
    return {
      add(index, file) {
        take(index, file);
        return undefined;
      },
      finish: async () => zipArchive(dense(sources), mtime),
    };
  const SLOTS = 2;
  const encoder = new TextEncoder();
  const buffers: Uint8Array[] = [];
  const reading: (Promise<unknown> | null)[] = [];
  const entries: Promise<ZipEntry>[] = [];
  let turn = 0;
  const start = (index: number, name: string, bytes: Uint8Array): Promise<ZipEntry> => {
    const size = bytes.length;
    const crc = zlib.crc32(bytes);
    const entry = new Promise<ZipEntry>((resolve, reject) =>
      zlib.deflateRaw(bytes, { level: ZIP_LEVEL }, (error, deflated) => (error ? reject(error) : resolve({ name, size, crc, deflated }))),
    );
    // A writer dropped before `finish` (its bundle failed) must not leave a rejection unheard.
    entry.catch(() => undefined);
    entries[index] = entry;
    return entry;
  };
  return {
    add(index, file) {
      take(index, file);
      const pieces = file.pieces;
      if (pieces === undefined) {
        start(index, file.name, file.bytes);
        return undefined;
      }
      const slot = turn;
      turn = (turn + 1) % SLOTS;
      const go = () => {
        const most = codeUnits(pieces) * 3;
        let buffer = buffers[slot];
        if (buffer === undefined || buffer.length < most) buffer = buffers[slot] = new Uint8Array(most);
        const done = start(index, file.name, encodePieces(encoder, pieces, buffer)).then(
          () => undefined,
          () => undefined,
        );
        reading[slot] = done;
        void done.then(() => {
          if (reading[slot] === done) reading[slot] = null;
        });
      };
      const busy = reading[slot];
      if (!busy) {
        go();
        return undefined;
      }
      return busy.then(go);
    },
    async finish() {
      dense(sources);
      return container(await Promise.all(entries), mtime);
    },
  };
}

/** The files of a writer, checked to have no gap. */
function dense(sources: ZipSource[]): ZipSource[] {
  for (let i = 0; i < sources.length; i++)
    if (sources[i] === undefined) throw new RangeError(`zip: file number ${i} was never added; allowed numbers with no gap from 0`);
  return sources;
}

/** Writes a text given as pieces as UTF-8 (as TextEncoder does) into `into`, which must hold it; returns the bytes written. */
function encodePieces(encoder: InstanceType<typeof TextEncoder>, { pieces, separator }: TextPieces, into: Uint8Array): Uint8Array {
  let at = 0;
  for (let i = 0; i < pieces.length; i++) {
    if (i > 0) at += encoder.encodeInto(separator, into.subarray(at)).written;
    at += encoder.encodeInto(pieces[i], into.subarray(at)).written;
  }
  return into.subarray(0, at);
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
    return (text: TextPieces): Uint8Array => encodePieces(encoder, text, (scratch ??= new Uint8Array(largest * 3)));
  });
}

/** The zip container (fflate's: local headers with data descriptors, then the central directory) of deflated entries. */
function container(entries: readonly ZipEntry[], mtime: Date): Uint8Array {
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
