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
import { decode, encode } from "fast-png";
import sharp from "sharp";
import type { Image } from "../src/image.ts";
import { decodePng, encodePng } from "../src/png.ts";
import * as before from "./baseline/png.ts";
import { benchPicture, measureInterleaved, printTable } from "./harness.ts";

const W = 1920;
const H = 1080;
const ROUNDS = Number(process.argv[2] ?? 9);
const WARM_UP = 2;

const rgba = benchPicture(W, H);
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
  const [library, now, old] = measureInterleaved([() => decode(png), () => decodePng(png), () => before.decodePng(png)], ROUNDS, WARM_UP);
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
  const [library, now, old] = measureInterleaved(
    [() => encode(input), () => encodePng(image), () => before.encodePng(image)],
    ROUNDS,
    WARM_UP,
  );
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
printTable(["case", "implementation", "ms", "÷ library"], rows, [0, 1]);
console.log("");
console.log(`peak memory of this process (max RSS): ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MB`);
