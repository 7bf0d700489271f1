/**
 * PNG benchmark (issue 10, item 2): decoding and encoding a 1920 × 1080 picture, RGBA and indexed.
 *
 * Three implementations, each measured on the same file or pixels in the same run:
 *   fast-png alone: `decode` / `encode` of fast-png 8, the PNG library the core used to wrap (its decode checks no CRC);
 *   the core now: decodePng / encodePng (src/png.ts): CRCs checked, bounded inflate, scanlines unfiltered in place;
 *   the core before: bench/baseline/png.ts, fast-png with a per-pixel conversion (closures and an array per pixel).
 * Each measurement runs in a fresh Node process of its own (this file, started with `--child`): the core and fast-png
 * share fflate, and in one process each one's use of it slows the other's compiled code (the core's decode took twice as
 * long interleaved with fast-png's as alone). A child runs its case after warm-up calls and reports the medians of its
 * wall and CPU times; the parent runs the three children of a case back to back, their order rotating every round, and
 * prints the medians over the rounds with each ratio to fast-png alone. CPU (user + system of the child) is what a busy
 * machine inflates least. Inputs: written by fast-png (filter type 0 on every line) and by sharp (libspng, adaptive
 * filters: every filter type), the same pixels in both. Issue 10's target: the core within 1.5 times fast-png alone.
 * A benchmark prints numbers, never verdicts: nothing here passes or fails.
 *
 * Run: `npx tsx bench/png.bench.ts [rounds]` (default 5 rounds; each child: 3 warm-up calls, then 7 timed).
 */
import { execFileSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { decode, encode } from "fast-png";
import sharp from "sharp";
import type { Image, Rgba } from "../src/image.ts";
import { decodePng, encodePng } from "../src/png.ts";
import * as before from "./baseline/png.ts";
import { benchPicture, median, printTable } from "./harness.ts";

const W = 1920;
const H = 1080;
const IMPLEMENTATIONS = ["fast-png alone", "the core now", "the core before"] as const;
type Implementation = (typeof IMPLEMENTATIONS)[number];
type Times = { wall: number; cpu: number; rssMb: number };

const palette: Rgba[] = Array.from({ length: 256 }, (_, i) => [i, (i * 7) & 255, 255 - i, 255]);

/** The calls a child times: decode a file, or encode pixels (raw RGBA or indices) as the given kind. */
function call(implementation: Implementation, job: string, bytes: Uint8Array): () => unknown {
  if (job === "decode")
    return [() => decode(bytes), () => decodePng(bytes), () => before.decodePng(bytes)][IMPLEMENTATIONS.indexOf(implementation)];
  const image: Image =
    job === "encode-rgba"
      ? { kind: "rgba", width: W, height: H, data: bytes }
      : { kind: "indexed", width: W, height: H, data: bytes, palette };
  const library = () =>
    image.kind === "rgba"
      ? encode({ width: W, height: H, data: bytes, channels: 4, depth: 8 })
      : encode({ width: W, height: H, data: bytes, channels: 1, depth: 8, palette: palette.map((c) => [...c]) });
  return [library, () => encodePng(image), () => before.encodePng(image)][IMPLEMENTATIONS.indexOf(implementation)];
}

if (process.argv[2] === "--child") {
  const [, , , implementation, job, path] = process.argv;
  const run = call(implementation as Implementation, job, new Uint8Array(readFileSync(path)));
  for (let i = 0; i < 3; i++) run();
  const wall: number[] = [];
  const cpu: number[] = [];
  for (let i = 0; i < 7; i++) {
    const c = process.cpuUsage();
    const start = performance.now();
    run();
    wall.push(performance.now() - start);
    const used = process.cpuUsage(c);
    cpu.push((used.user + used.system) / 1000);
  }
  process.stdout.write(JSON.stringify({ wall: median(wall), cpu: median(cpu), rssMb: process.resourceUsage().maxRSS / 1024 }));
  process.exit(0);
}

const ROUNDS = Number(process.argv[2] ?? 5);
const dir = mkdtempSync(join(os.tmpdir(), "skewsmith-png-bench-"));
process.on("exit", () => rmSync(dir, { recursive: true, force: true }));
const self = fileURLToPath(import.meta.url);
const tsx = fileURLToPath(import.meta.resolve("tsx"));

const rgba = benchPicture(W, H);
const indices = Uint8Array.from({ length: W * H }, (_, i) => (((i % W) >> 4) + ((i / W) >> 4) * 7 + (rgba[4 * i] & 3)) & 255);
const inputs: [string, string, Uint8Array][] = [
  ["decode RGBA, written by fast-png", "decode", encode({ width: W, height: H, data: rgba, channels: 4, depth: 8 })],
  [
    "decode RGBA, written by sharp",
    "decode",
    new Uint8Array(
      await sharp(rgba, { raw: { width: W, height: H, channels: 4 } })
        .png({ adaptiveFiltering: true })
        .toBuffer(),
    ),
  ],
  [
    "decode indexed, written by fast-png",
    "decode",
    encode({ width: W, height: H, data: indices, channels: 1, depth: 8, palette: palette.map((c) => [...c]) }),
  ],
  ["encode RGBA", "encode-rgba", rgba],
  ["encode indexed", "encode-indexed", indices],
];

const rows: string[][] = [];
for (const [name, job, bytes] of inputs) {
  const path = join(dir, `${job}-${rows.length}.bin`);
  writeFileSync(path, bytes);
  const results = new Map<Implementation, Times[]>(IMPLEMENTATIONS.map((i) => [i, []]));
  for (let round = 0; round < ROUNDS; round++)
    for (let k = 0; k < IMPLEMENTATIONS.length; k++) {
      const implementation = IMPLEMENTATIONS[(k + round) % IMPLEMENTATIONS.length];
      const out = execFileSync(process.execPath, ["--import", tsx, self, "--child", implementation, job, path], { encoding: "utf8" });
      results.get(implementation)!.push(JSON.parse(out) as Times);
    }
  const med = (i: Implementation): Times => {
    const r = results.get(i)!;
    return { wall: median(r.map((t) => t.wall)), cpu: median(r.map((t) => t.cpu)), rssMb: median(r.map((t) => t.rssMb)) };
  };
  const library = med("fast-png alone");
  IMPLEMENTATIONS.forEach((i, k) => {
    const t = med(i);
    const size = job === "decode" ? ` (${(bytes.length / 1e6).toFixed(1)} MB)` : "";
    const ratios = [(t.wall / library.wall).toFixed(2), t.cpu.toFixed(1), (t.cpu / library.cpu).toFixed(2), t.rssMb.toFixed(0)];
    rows.push([k ? "" : `${name}${size}`, i, t.wall.toFixed(1), ...ratios]);
  });
}

const cpu = os.cpus();
console.log(`PNG benchmark: ${W}×${H}, each case in its own process, medians over ${ROUNDS} rounds (7 timed calls each).`);
console.log(
  `Node ${process.version}, ${cpu.length} × ${cpu[0]?.model ?? "unknown CPU"}, load average ${os.loadavg()[0].toFixed(2)} at the end.`,
);
console.log("÷ library: the case's median over fast-png's own decode or encode of the same file or pixels, in this run. Target ≤ 1.5.");
console.log("CPU: user + system time of the measuring process, which a busy machine inflates less than wall time.");
console.log("RSS: peak memory of the measuring process (Node itself, the input, 10 calls).");
console.log("");
printTable(["case", "implementation", "wall ms", "÷ library", "CPU ms", "÷ library", "RSS MB"], rows, [0, 1]);
