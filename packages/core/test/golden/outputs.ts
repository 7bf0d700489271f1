// Runs the golden jobs through the command line (in process, the same `main` the binary calls) and the public API, and
// reduces every output to what the fixtures keep: hashes, per-frame hashes and the mean errors (the one figure allowed
// to move, by at most 1e-9 px, because its sum may be taken in another order; docs/shear-core.md §6).
import { createHash } from "node:crypto";
import { mkdirSync, readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { decode } from "fast-png";
import { unzipSync } from "fflate";
import { main } from "../../src/cli/main.ts";
import { processIo } from "../../src/cli/io.ts";
import {
  angleTrack,
  compileFrame,
  compileTables,
  parseEffect,
  renderImage,
  tablesDocument,
  type FrameShifts,
  type Image,
} from "../../src/index.ts";
import { pngBytes } from "../helpers/pngBytes.ts";
import type { ExportJob, RenderJob, TablesJob } from "./cases.ts";

/** The first 16 hex digits (64 bits) of the SHA-256 of the bytes or text. */
export const hash = (data: Uint8Array | string, digits = 16) => createHash("sha256").update(data).digest("hex").slice(0, digits);

const MEAN = /"meanErrorPx":(\s*)(-?[\d.eE+-]+)/g;

/** The text with every meanErrorPx value replaced by "*", and the values taken out, in order. */
export function splitMeans(text: string): { text: string; means: number[] } {
  const means: number[] = [];
  const rest = text.replace(MEAN, (_, space: string, value: string) => {
    means.push(Number(value));
    return `"meanErrorPx":${space}"*"`;
  });
  return { text: rest, means };
}

/** What the fixtures keep of a tables document: its hash without the means, one short hash per frame, and the means. */
export interface TablesDigest {
  /** Hash of the whole text with the means replaced by "*". */
  readonly text: string;
  /** Hash of the document's head (format, effect, element type). */
  readonly head: string;
  /** Per frame, an 8-digit hash of the frame without its mean, space-separated. */
  readonly frames: string;
  readonly means: readonly number[];
}

export function tablesDigest(text: string): TablesDigest {
  const { text: rest, means } = splitMeans(text);
  const doc = JSON.parse(rest) as { frames: Record<string, unknown>[] };
  const frames = doc.frames.map((f) => hash(JSON.stringify(f), 8)).join(" ");
  const head = hash(JSON.stringify({ ...doc, frames: doc.frames.length }), 8);
  return { text: hash(rest), head, frames, means };
}

/** A capturing CLI io: stdout and stderr as text, files through the real file system. */
function captureIo() {
  const out = { stdout: "", stderr: "" };
  const io = { ...processIo, stdout: (t: string) => void (out.stdout += t), stderr: (t: string) => void (out.stderr += t) };
  return { io, out };
}

async function cli(args: string[]): Promise<{ stdout: string; stderr: string }> {
  const { io, out } = captureIo();
  const code = await main(args, io);
  if (code !== 0) throw new Error(`skewsmith ${args.join(" ")}: exit ${code}: ${out.stderr}`);
  return out;
}

/** A fixed pseudo-random sequence (the 32-bit linear congruential generator of Numerical Recipes; common practice). */
function sequence(seed: number): () => number {
  let x = seed >>> 0;
  return () => (x = (Math.imul(x, 1664525) + 1013904223) >>> 0);
}

/** A mask drawn by the job's rule, one byte per canvas pixel. */
export function jobMask(rule: NonNullable<TablesJob["mask"]>, width: number, height: number): Uint8Array {
  const mask = new Uint8Array(width * height);
  const next = sequence(width * 7919 + height);
  for (let r = 0; r < height; r++)
    for (let c = 0; c < width; c++) {
      const x = (c + 0.5 - width / 2) / (width / 2);
      const y = (r + 0.5 - height / 2) / (height / 2);
      if (rule === "ellipse") mask[r * width + c] = x * x + y * y <= 0.8 ? 1 : 0;
      else if (rule === "noise") mask[r * width + c] = next() >>> 31;
      else if (r * width + c < (width * height) / 2) mask[r * width + c] = mask[width * height - 1 - (r * width + c)] = next() >>> 31;
    }
  return mask;
}

/** Runs `skewsmith tables` (or, for a masked job, compileTables with the mask) and digests the document. */
export async function tablesOutput(job: TablesJob, dir: string): Promise<{ text: string; digest: TablesDigest }> {
  let text: string;
  if (job.mask) {
    const effect = parseEffect(job.effect);
    const mask = jobMask(job.mask, effect.canvas.width, effect.canvas.height);
    text = `${JSON.stringify(tablesDocument(compileTables(effect, { mask })))}\n`;
  } else {
    const path = join(dir, "effect.json");
    writeFileSync(path, JSON.stringify(job.effect));
    text = (await cli(["tables", path])).stdout;
  }
  return { text, digest: tablesDigest(text) };
}

/** A canvas-sized test picture: noise with about one pixel in eight left as background (index 0, transparent). */
export function testImage(kind: "indexed" | "rgba", width: number, height: number): Image {
  const next = sequence(width * 31 + height * 17 + (kind === "rgba" ? 1 : 0));
  const n = width * height;
  if (kind === "indexed") {
    const data = new Uint8Array(n);
    for (let i = 0; i < n; i++) {
      const x = next();
      data[i] = x >>> 29 === 0 ? 0 : 1 + ((x >>> 8) % 15);
    }
    const palette = Array.from({ length: 16 }, (_, i) =>
      i === 0 ? ([0, 0, 0, 0] as const) : ([i * 15, 255 - i * 13, (i * 71) % 256, 255] as const),
    );
    return { kind, width, height, data, palette };
  }
  const data = new Uint8Array(n * 4);
  for (let i = 0; i < n; i++) {
    const x = next();
    if (x >>> 29 === 0) continue;
    data[4 * i] = x >>> 24;
    data[4 * i + 1] = x >>> 16;
    data[4 * i + 2] = x >>> 8;
    data[4 * i + 3] = 128 + (x & 127);
  }
  return { kind, width, height, data };
}

/** The picture as PNG bytes written by hand from the PNG specification (test/helpers/pngBytes.ts), not by the core. */
function imagePng(image: Image): Uint8Array {
  if (image.kind === "rgba")
    return pngBytes({ width: image.width, height: image.height, depth: 8, colorType: 6, samples: Array.from(image.data) });
  const palette = image.palette.map((p) => [p[0], p[1], p[2]] as const);
  return pngBytes({
    width: image.width,
    height: image.height,
    depth: 8,
    colorType: 3,
    samples: Array.from(image.data),
    palette,
    trns: [0],
  });
}

/** Frame `index` of a render job: the effect's, or for a job with noise shifts, the flip with tables drawn at random in ±1.5 canvas. */
export function jobFrame(job: RenderJob, index: number): FrameShifts {
  const effect = parseEffect(job.effect);
  const frame = compileFrame(effect, index, angleTrack(effect.angles)[index]);
  if (job.shifts !== "noise") return frame;
  const { width, height } = effect.canvas;
  const next = sequence(index * 101 + width);
  const noise = (n: number, side: number) => Int32Array.from({ length: n }, () => (next() % (3 * side + 1)) - Math.floor((3 * side) / 2));
  return { flip: frame.flip, h: noise(height, width), v: noise(width, height) };
}

/** One rendered frame: which frame and pass, the hash of the PNG file (CLI jobs) and of the pixels. */
export interface RenderDigest {
  readonly frame: number;
  readonly pass: number;
  readonly png?: string;
  readonly pixels: string;
}

/** Renders every frame and pass of the job: through `skewsmith render` and its files, or renderImage on the pixels. */
export async function renderOutputs(job: RenderJob, dir: string): Promise<RenderDigest[]> {
  const effect = parseEffect(job.effect);
  const image = testImage(job.image, effect.canvas.width, effect.canvas.height);
  const digests: RenderDigest[] = [];
  if (job.via === "api") {
    for (const frame of job.frames)
      for (const pass of job.passes)
        digests.push({ frame, pass, pixels: hash(renderImage(image, jobFrame(job, frame), effect, pass).data) });
    return digests;
  }
  const effectPath = join(dir, "effect.json");
  writeFileSync(effectPath, JSON.stringify(job.effect));
  const imagePath = join(dir, "in.png");
  writeFileSync(imagePath, imagePng(image));
  for (const frame of job.frames)
    for (const pass of job.passes) {
      const out = join(dir, `out-${frame}-${pass}.png`);
      if (job.shifts) throw new Error(`${job.id}: noise shifts are for API jobs`);
      await cli(["render", effectPath, "--image", imagePath, "--frame", String(frame), "--pass", String(pass), "--out", out]);
      const png = new Uint8Array(readFileSync(out));
      // The pixels as the PNG library reads them back: a change of encoding alone leaves this hash alone.
      const decoded = decode(png);
      digests.push({
        frame,
        pass,
        png: hash(png),
        pixels: hash(new Uint8Array(decoded.data.buffer, decoded.data.byteOffset, decoded.data.byteLength)),
      });
    }
  return digests;
}

/** One file of a bundle: name, length in bytes and hash (the tables document's with its means taken out, kept beside). */
export interface FileDigest {
  readonly name: string;
  readonly bytes: number;
  readonly hash: string;
  readonly means?: readonly number[];
}

/** One zip entry from the central directory (APPNOTE.TXT §4.3.12): name, CRC-32, size, DOS time and date, content hash. */
export interface ZipEntryDigest {
  readonly name: string;
  readonly crc: string;
  readonly bytes: number;
  readonly dosTime: number;
  readonly dosDate: number;
  readonly hash: string;
}

export interface ExportDigest {
  readonly stdout: string;
  readonly stderr: string;
  readonly files: readonly FileDigest[];
  readonly zip: readonly ZipEntryDigest[];
}

/** The entries of a zip, read from its central directory (PKWARE APPNOTE.TXT: end record signature 0x06054b50, entries 0x02014b50). */
export function zipEntries(zip: Uint8Array): { name: string; crc: number; bytes: number; dosTime: number; dosDate: number }[] {
  const view = new DataView(zip.buffer, zip.byteOffset, zip.byteLength);
  let end = zip.length - 22;
  while (end >= 0 && view.getUint32(end, true) !== 0x06054b50) end--;
  if (end < 0) throw new Error("zip: no end of central directory record");
  const count = view.getUint16(end + 10, true);
  let at = view.getUint32(end + 16, true);
  const entries = [];
  for (let i = 0; i < count; i++) {
    if (view.getUint32(at, true) !== 0x02014b50) throw new Error(`zip: entry ${i} has no central directory signature`);
    const nameLength = view.getUint16(at + 28, true);
    const extra = view.getUint16(at + 30, true);
    const comment = view.getUint16(at + 32, true);
    entries.push({
      name: new TextDecoder().decode(zip.subarray(at + 46, at + 46 + nameLength)),
      dosTime: view.getUint16(at + 12, true),
      dosDate: view.getUint16(at + 14, true),
      crc: view.getUint32(at + 16, true),
      bytes: view.getUint32(at + 24, true),
    });
    at += 46 + nameLength + extra + comment;
  }
  return entries;
}

/**
 * A file as the fixtures keep it. The tables document carries the means, so its length and CRC move with them: it is
 * kept with its means replaced by "*" (length and hash of that text) and the means beside.
 */
function fileDigest(name: string, bytes: Uint8Array): FileDigest {
  if (name.endsWith(".json") && !name.endsWith(".effect.json")) {
    const { text, means } = splitMeans(new TextDecoder().decode(bytes));
    if (means.length) return { name, bytes: new TextEncoder().encode(text).length, hash: hash(text), means };
  }
  return { name, bytes: bytes.length, hash: hash(bytes) };
}

/** Runs `skewsmith export FILE --out DIR --zip FILE …flags` and digests every file written and every zip entry. */
export async function exportOutput(job: ExportJob, dir: string): Promise<{ digest: ExportDigest; files: Map<string, Uint8Array> }> {
  const effectPath = join(dir, job.file);
  writeFileSync(effectPath, JSON.stringify(job.effect));
  const out = join(dir, "bundle");
  mkdirSync(out, { recursive: true });
  const zipPath = join(dir, "bundle.zip");
  const r = await cli(["export", effectPath, "--out", out, "--zip", zipPath, ...job.args]);
  const names = r.stdout
    .trimEnd()
    .split("\n")
    .map((line) => line.split("\t")[0])
    .filter((p) => p !== zipPath)
    .map((p) => p.slice(out.length + 1));
  const files = new Map(names.map((n) => [n, new Uint8Array(readFileSync(join(out, n)))]));
  const zip = new Uint8Array(readFileSync(zipPath));
  const contents = unzipSync(zip);
  const digests = names.map((n) => fileDigest(n, files.get(n)!));
  const zipDigest = zipEntries(zip).map((e) => {
    const d = fileDigest(e.name, contents[e.name]);
    // An entry that carries means is kept like its file: its CRC and length move with them.
    const crc = d.means ? "*" : e.crc.toString(16).padStart(8, "0");
    return { name: e.name, crc, bytes: d.means ? d.bytes : e.bytes, dosTime: e.dosTime, dosDate: e.dosDate, hash: d.hash };
  });
  const sizes = new Map(digests.map((d) => [join(out, d.name), d.bytes]));
  return {
    digest: {
      // The zip's own line is left out (its length moves with the deflate level, while its entries below may not), and
      // each file's length is the one its digest keeps.
      stdout: r.stdout
        .split("\n")
        .filter((line) => !line.startsWith(`${zipPath}\t`))
        .map((line) => (sizes.has(line.split("\t")[0]) ? `${line.split("\t")[0]}\t${sizes.get(line.split("\t")[0])} bytes` : line))
        .join("\n")
        .split(dir)
        .join("<DIR>"),
      stderr: r.stderr,
      files: digests,
      zip: zipDigest,
    },
    files,
  };
}
