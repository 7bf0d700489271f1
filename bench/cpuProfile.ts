/**
 * Reads a V8 CPU profile (`node --cpu-prof` writes one `.cpuprofile` per process) and prints where the time went:
 * self time by function and by package (or app file), as shares of all samples. Used by bench/load.ts --cpu-prof.
 *
 * Run on its own: `node --import tsx bench/cpuProfile.ts FILE.cpuprofile [top]`.
 */
import { readFileSync } from "node:fs";
import path from "node:path";
import { pathToFileURL } from "node:url";

interface ProfileNode {
  id: number;
  callFrame: { functionName: string; url: string; lineNumber: number };
  hitCount?: number;
  children?: number[];
}
interface Profile {
  nodes: ProfileNode[];
  startTime: number;
  endTime: number;
  samples?: number[];
  timeDeltas?: number[];
}

/** Where a script URL belongs: an npm package by name, an app file by its path, or a V8/Node bucket. */
function owner(url: string): string {
  if (!url) return "(native / V8)";
  const clean = url.replace(/^file:\/\//, "");
  const nm = clean.lastIndexOf("/node_modules/");
  if (nm >= 0) {
    const rest = clean.slice(nm + "/node_modules/".length).split("/");
    return rest[0].startsWith("@") ? `${rest[0]}/${rest[1]}` : rest[0];
  }
  if (clean.startsWith("node:")) return clean;
  return path.relative(process.cwd(), clean) || clean;
}

/** Self time per function and per owner, in milliseconds, largest first. */
export function summarise(profile: Profile): {
  totalMs: number;
  byFunction: { name: string; ms: number }[];
  byOwner: { name: string; ms: number }[];
} {
  const byId = new Map(profile.nodes.map((n) => [n.id, n]));
  const self = new Map<number, number>();
  if (profile.samples && profile.timeDeltas) {
    for (let i = 0; i < profile.samples.length; i++) {
      const id = profile.samples[i];
      self.set(id, (self.get(id) ?? 0) + (profile.timeDeltas[i] ?? 0) / 1000);
    }
  } else {
    const interval =
      (profile.endTime - profile.startTime) /
      1000 /
      Math.max(
        1,
        profile.nodes.reduce((s, n) => s + (n.hitCount ?? 0), 0),
      );
    for (const n of profile.nodes) self.set(n.id, (n.hitCount ?? 0) * interval);
  }
  const fn = new Map<string, number>();
  const own = new Map<string, number>();
  let total = 0;
  for (const [id, ms] of self) {
    const node = byId.get(id);
    if (!node) continue;
    total += ms;
    const { functionName, url, lineNumber } = node.callFrame;
    const where = owner(url);
    const key = `${functionName || "(anonymous)"}  ${where}${url ? `:${lineNumber + 1}` : ""}`;
    fn.set(key, (fn.get(key) ?? 0) + ms);
    own.set(where, (own.get(where) ?? 0) + ms);
  }
  const sorted = (m: Map<string, number>) => [...m].map(([name, ms]) => ({ name, ms })).sort((a, b) => b.ms - a.ms);
  return { totalMs: total, byFunction: sorted(fn), byOwner: sorted(own) };
}

/** Prints the top entries of a profile file. */
export function printProfile(file: string, top = 25): void {
  const { totalMs, byFunction, byOwner } = summarise(JSON.parse(readFileSync(file, "utf8")) as Profile);
  const share = (ms: number) => `${((100 * ms) / totalMs).toFixed(1).padStart(5)} %`;
  console.log(`\nCPU profile ${path.basename(file)}: ${(totalMs / 1000).toFixed(1)} s sampled`);
  console.log("  self time by package or file:");
  for (const o of byOwner.slice(0, 15)) console.log(`    ${share(o.ms)}  ${o.name}`);
  console.log("  self time by function:");
  for (const f of byFunction.slice(0, top)) console.log(`    ${share(f.ms)}  ${f.name}`);
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) {
  const [file, top] = process.argv.slice(2);
  if (!file) {
    console.error("usage: node --import tsx bench/cpuProfile.ts FILE.cpuprofile [top]");
    process.exit(2);
  }
  printProfile(file, Number(top ?? 25));
}
