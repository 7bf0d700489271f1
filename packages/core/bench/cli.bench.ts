/**
 * Command-line benchmark (issue 10, items 1–3 and 7): whole processes, as a Makefile calls them, each against its
 * baseline measured in the same run, in pairs (baseline and case back to back, the order alternating every round), so
 * that a drift of the machine's speed hits both. Printed: the median of each, the median of the per-pair ratios with
 * their range (a wide range says the machine was noisy), and the peak memory (max RSS) of the case's process.
 *
 * Cases (targets of issue 10 beside them):
 *   skewsmith --help (the build)                       ÷ node -e 0     target ≤ 2
 *   skewsmith --help from source through tsx (before)  ÷ node -e 0     what the build replaced
 *   skewsmith tables, 4096-frame 320 × 240 sweep       ÷ node -e 0     target ≤ 8
 *   skewsmith export --zip of the same sweep           ÷ node -e 0     target ≤ 12
 *                                                      ÷ tables        target ≤ 2
 *   skewsmith render of one 1920 × 1080 RGBA frame     ÷ node -e 0     target ≤ 10
 * Peak memory comes from GNU time (/usr/bin/time, Debian package "time"), wall time from this process around the spawn.
 * A benchmark prints numbers, never verdicts: nothing here passes or fails.
 *
 * Run: `npx tsx bench/cli.bench.ts [rounds]` (default 7 counted rounds after 1 warm-up; it builds dist/ first).
 */
import { execFileSync, spawnSync } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { encode } from "fast-png";
import { benchPicture, median, printTable } from "./harness.ts";

const ROUNDS = Number(process.argv[2] ?? 7);
const WARM_UP = 1;
const TIME = "/usr/bin/time";
const root = fileURLToPath(new URL("..", import.meta.url));
const BIN = join(root, "bin/skewsmith.mjs");
const SOURCE = join(root, "test/helpers/sourceCli.mjs");

if (!existsSync(TIME)) {
  console.error(`${TIME} is missing: the benchmark reads peak memory from GNU time (Debian package "time").`);
  process.exit(1);
}
execFileSync(process.execPath, [join(root, "scripts/build.mjs")], { stdio: "inherit" });

const dir = mkdtempSync(join(os.tmpdir(), "skewsmith-bench-"));
process.on("exit", () => rmSync(dir, { recursive: true, force: true }));
const file = (name: string) => join(dir, name);
writeFileSync(
  file("sweep.json"),
  JSON.stringify({ canvas: { width: 320, height: 240 }, pivot: { x: 160, y: 120 }, angles: { sweep: { from: 0, to: 360, frames: 4096 } } }),
);
writeFileSync(
  file("hd.json"),
  JSON.stringify({ canvas: { width: 1920, height: 1080 }, pivot: { x: 960, y: 540 }, angles: { list: [0, 30] } }),
);
// The 1920 × 1080 RGBA picture, written by fast-png so that the reader under test did not write its own input.
writeFileSync(file("hd.png"), encode({ width: 1920, height: 1080, data: benchPicture(1920, 1080), channels: 4, depth: 8 }));

interface Run {
  readonly ms: number;
  readonly rssKb: number;
}

/** Runs one whole process under GNU time; returns its wall time (ms, measured here) and peak RSS (KB, from time). */
function runOnce(args: readonly string[]): Run {
  const rssFile = file("rss.txt");
  const start = performance.now();
  const r = spawnSync(TIME, ["-f", "%M", "-o", rssFile, ...args], { cwd: dir, stdio: ["ignore", "ignore", "pipe"], maxBuffer: 1 << 26 });
  const ms = performance.now() - start;
  if (r.status !== 0) throw new Error(`${args.join(" ")} failed (exit ${r.status}):\n${r.stderr.toString().slice(0, 2000)}`);
  return { ms, rssKb: Number(readFileSync(rssFile, "utf8").trim().split("\n").at(-1)) };
}

interface Pair {
  readonly name: string;
  readonly baselineName: string;
  readonly target: string;
  readonly baseline: readonly string[];
  readonly subject: readonly string[];
}

const node0 = [process.execPath, "-e", "0"];
const built = (...args: string[]) => [process.execPath, BIN, ...args];
const source = (...args: string[]) => [process.execPath, SOURCE, ...args];
const tables = built("tables", "sweep.json");

const pairs: Pair[] = [
  { name: "skewsmith --help (built)", baselineName: "node -e 0", target: "≤ 2", baseline: node0, subject: built("--help") },
  { name: "skewsmith --help (source via tsx, before)", baselineName: "node -e 0", target: "", baseline: node0, subject: source("--help") },
  { name: "tables, 4096 × 320×240 sweep", baselineName: "node -e 0", target: "≤ 8", baseline: node0, subject: tables },
  {
    name: "export --zip, same sweep",
    baselineName: "node -e 0",
    target: "≤ 12",
    baseline: node0,
    subject: built("export", "sweep.json", "--zip", "sweep.zip"),
  },
  {
    name: "export --zip, same sweep",
    baselineName: "tables, same sweep",
    target: "≤ 2",
    baseline: tables,
    subject: built("export", "sweep.json", "--zip", "sweep.zip"),
  },
  {
    name: "render, one 1920×1080 RGBA frame",
    baselineName: "node -e 0",
    target: "≤ 10",
    baseline: node0,
    subject: built("render", "hd.json", "--image", "hd.png", "--frame", "1", "--out", "out.png"),
  },
];

const rows: string[][] = [];
for (const p of pairs) {
  const base: Run[] = [];
  const subject: Run[] = [];
  for (let round = 0; round < WARM_UP + ROUNDS; round++) {
    // Alternate which goes first, so neither always runs on a warmer (or busier) machine.
    let b: Run;
    let s: Run;
    if (round % 2) {
      s = runOnce(p.subject);
      b = runOnce(p.baseline);
    } else {
      b = runOnce(p.baseline);
      s = runOnce(p.subject);
    }
    if (round < WARM_UP) continue;
    subject.push(s);
    base.push(b);
  }
  const ratios = subject.map((s, i) => s.ms / base[i].ms);
  rows.push([
    p.name,
    median(subject.map((r) => r.ms)).toFixed(0),
    p.baselineName,
    median(base.map((r) => r.ms)).toFixed(0),
    median(ratios).toFixed(2),
    `${Math.min(...ratios).toFixed(2)}–${Math.max(...ratios).toFixed(2)}`,
    p.target,
    (median(subject.map((r) => r.rssKb)) / 1024).toFixed(0),
    (median(base.map((r) => r.rssKb)) / 1024).toFixed(0),
  ]);
}

const cpu = os.cpus();
console.log(`Command-line benchmark: whole processes, ${ROUNDS} paired rounds after ${WARM_UP} warm-up, medians.`);
console.log(
  `Node ${process.version}, ${cpu.length} × ${cpu[0]?.model ?? "unknown CPU"}, load average ${os.loadavg()[0].toFixed(2)} at the end.`,
);
console.log("ratio: the case's wall time over its baseline's in the same round; range: the smallest and largest of those ratios.");
console.log("");
printTable(["case", "ms", "baseline", "ms", "ratio", "range", "target", "RSS MB", "base RSS MB"], rows, [0, 2]);
