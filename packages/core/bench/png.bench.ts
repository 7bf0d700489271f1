/**
 * PNG benchmark (issue 10, item 2): decoding and encoding a 1920 × 1080 picture, RGBA and indexed, in one process.
 *
 * Every case runs once per round, rounds interleaved, after warm-up rounds; the table shows each case's median and its
 * ratio to the library alone measured in the same run:
 *   fast-png alone: `decode` / `encode` of fast-png 8, the PNG library the core used to wrap (its decode checks no CRC);
 *   the core now: decodePng / encodePng (src/png.ts): CRCs checked, bounded inflate, scanlines unfiltered in place;
 *   the core before: bench/baseline/png.ts, fast-png with a per-pixel conversion (closures and an array per pixel).
 * Inputs: written by fast-png (filter type 0 on every line) and by sharp (libspng, adaptive filters: every filter type),
 * the same pixels in both. Issue 10's target: the core within 1.5 times fast-png alone. Peak memory (max RSS) of the
 * whole benchmark process is printed at the end.
 * A benchmark prints numbers, never verdicts: nothing here passes or fails.
 *
 * Run: `npx tsx bench/png.bench.ts [rounds]` (default 9 rounds after 2 warm-up rounds).
 */
import os from "node:os";
import v8 from "node:v8";
import vm from "node:vm";
import { decode, encode } from "fast-png";
import sharp from "sharp";
import type { Image } from "../src/image.ts";
import { decodePng, encodePng } from "../src/png.ts";
import * as before from "./baseline/png.ts";

const W = 1920;
const H = 1080;
const ROUNDS = Number(process.argv[2] ?? 9);
const WARM_UP = 2;

v8.setFlagsFromString("--expose-gc");
const collectGarbage = vm.runInNewContext("gc") as () => void;

const median = (xs: readonly number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
};

/** Runs every case once per round, rounds interleaved; returns each case's median in ms. */
function measure(cases: readonly (() => unknown)[]): number[] {
  const times = cases.map(() => [] as number[]);
  for (let round = 0; round < WARM_UP + ROUNDS; round++)
    cases.forEach((run, i) => {
      collectGarbage();
      const start = performance.now();
      run();
      const ms = performance.now() - start;
      if (round >= WARM_UP) times[i].push(ms);
    });
  return times.map(median);
}

// A picture with gradients, edges and a little noise, so that it compresses about as a drawn frame does.
const rgba = new Uint8Array(W * H * 4);
let seed = 12345;
for (let i = 0; i < W * H; i++) {
  seed = (seed * 1103515245 + 12345) >>> 0;
  const x = i % W;
  const y = (i / W) | 0;
  const noise = (seed >>> 24) & 15;
  rgba.set([(x >> 3) ^ noise, (y >> 2) + noise, ((x * y) >> 10) & 255, (x + y) % 97 < 3 ? 0 : 255], 4 * i);
}
const indices = Uint8Array.from({ length: W * H }, (_, i) => (((i % W) >> 4) + ((i / W) >> 4) * 7 + (rgba[4 * i] & 3)) & 255);
const palette = Array.from({ length: 256 }, (_, i) => [i, (i * 7) & 255, 255 - i, 255] as const);
const rgbaImage: Image = { kind: "rgba", width: W, height: H, data: rgba };
const indexedImage: Image = { kind: "indexed", width: W, height: H, data: indices, palette };

const files = {
  "RGBA, fast-png": encode({ width: W, height: H, data: rgba, channels: 4, depth: 8 }),
  "RGBA, sharp": new Uint8Array(
    await sharp(rgba, { raw: { width: W, height: H, channels: 4 } })
      .png({ adaptiveFiltering: true })
      .toBuffer(),
  ),
  "indexed, fast-png": encode({ width: W, height: H, data: indices, channels: 1, depth: 8, palette: palette.map((c) => [...c]) }),
};

const rows: string[][] = [];
for (const [name, png] of Object.entries(files)) {
  const [library, now, old] = measure([() => decode(png), () => decodePng(png), () => before.decodePng(png)]);
  rows.push(
    [`decode ${name} (${(png.length / 1e6).toFixed(1)} MB)`, "fast-png alone", library.toFixed(1), "1.00"],
    ["", "the core now", now.toFixed(1), (now / library).toFixed(2)],
    ["", "the core before", old.toFixed(1), (old / library).toFixed(2)],
  );
}
for (const [name, image] of [
  ["RGBA", rgbaImage],
  ["indexed", indexedImage],
] as const) {
  const input: Parameters<typeof encode>[0] =
    image.kind === "rgba"
      ? { width: W, height: H, data: image.data, channels: 4, depth: 8 }
      : { width: W, height: H, data: image.data, channels: 1, depth: 8, palette: palette.map((c) => [...c]) };
  const [library, now, old] = measure([() => encode(input), () => encodePng(image), () => before.encodePng(image)]);
  rows.push(
    [`encode ${name}`, "fast-png alone", library.toFixed(1), "1.00"],
    ["", "the core now", now.toFixed(1), (now / library).toFixed(2)],
    ["", "the core before", old.toFixed(1), (old / library).toFixed(2)],
  );
}

const cpu = os.cpus();
console.log(`PNG benchmark: ${W}×${H}, medians of ${ROUNDS} interleaved rounds after ${WARM_UP} warm-up rounds.`);
console.log(
  `Node ${process.version}, ${cpu.length} × ${cpu[0]?.model ?? "unknown CPU"}, load average ${os.loadavg()[0].toFixed(2)} at the end.`,
);
console.log("÷ library: the case's median over fast-png's own decode or encode of the same file or pixels, in this run. Target ≤ 1.5.");
console.log("");
const header = ["case", "implementation", "ms", "÷ library"];
const widths = header.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i].length)));
const line = (r: readonly string[]) => r.map((cell, i) => (i < 2 ? cell.padEnd(widths[i]) : cell.padStart(widths[i]))).join("  ");
console.log(line(header));
console.log(widths.map((w) => "-".repeat(w)).join("  "));
for (const r of rows) console.log(line(r).trimEnd());
console.log("");
console.log(`peak memory of this process (max RSS): ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MB`);
