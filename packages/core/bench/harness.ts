/** Pieces the benchmarks share: medians, interleaved rounds with a collection before each case, and the printed table. */
import v8 from "node:v8";
import vm from "node:vm";

/** The median of some numbers. */
export function median(xs: readonly number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

v8.setFlagsFromString("--expose-gc");
/** A full garbage collection, run before every timed case (outside the timing) so no case pays for another's garbage. */
export const collectGarbage = vm.runInNewContext("gc") as () => void;

/**
 * Runs every case once per round, rounds interleaved so all see the same machine load; returns each case's median wall
 * time and median CPU time (user + system of this process, which other processes on a busy machine do not inflate), in ms.
 */
export function measureInterleaved(cases: readonly (() => unknown)[], rounds: number, warmUp: number): { wall: number; cpu: number }[] {
  const wall = cases.map(() => [] as number[]);
  const cpu = cases.map(() => [] as number[]);
  for (let round = 0; round < warmUp + rounds; round++)
    cases.forEach((run, i) => {
      collectGarbage();
      const cpuStart = process.cpuUsage();
      const start = performance.now();
      run();
      const ms = performance.now() - start;
      const used = process.cpuUsage(cpuStart);
      if (round < warmUp) return;
      wall[i].push(ms);
      cpu[i].push((used.user + used.system) / 1000);
    });
  return cases.map((_, i) => ({ wall: median(wall[i]), cpu: median(cpu[i]) }));
}

/** Prints rows under a header, columns padded; the columns in `left` are left-aligned, the others right-aligned. */
export function printTable(header: readonly string[], rows: readonly (readonly string[])[], left: readonly number[]): void {
  const widths = header.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i].length)));
  const line = (r: readonly string[]) =>
    r.map((cell, i) => (left.includes(i) ? cell.padEnd(widths[i]) : cell.padStart(widths[i]))).join("  ");
  console.log(line(header));
  console.log(widths.map((w) => "-".repeat(w)).join("  "));
  for (const r of rows) console.log(line(r).trimEnd());
}

/**
 * A `width` × `height` RGBA picture (bytes R, G, B, A) with gradients, hard edges, some transparent pixels and a little
 * noise from a fixed seed, so that it compresses about as a drawn frame does and is the same in every run.
 */
export function benchPicture(width: number, height: number): Uint8Array {
  const rgba = new Uint8Array(width * height * 4);
  let seed = 12345;
  for (let i = 0; i < width * height; i++) {
    seed = (seed * 1103515245 + 12345) >>> 0; // a linear congruential generator (common practice)
    const x = i % width;
    const y = (i / width) | 0;
    const noise = (seed >>> 24) & 15;
    rgba[4 * i] = (x >> 3) ^ noise;
    rgba[4 * i + 1] = (y >> 2) + noise;
    rgba[4 * i + 2] = ((x * y) >> 10) & 255;
    rgba[4 * i + 3] = (x + y) % 97 < 3 ? 0 : 255;
  }
  return rgba;
}
