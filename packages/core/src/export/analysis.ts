import type { CompiledTables, FrameTables } from "../compileTables.ts";
import type { Sign } from "./options.ts";

/** Whether an export option can be applied to an effect, and why (or why not). */
export interface Availability {
  readonly available: boolean;
  readonly reason: string;
}

/** What the exporters need to know about an effect's compiled frames before laying out tables. */
export interface ExportAnalysis {
  readonly frames: number;
  /** Canvas width and height in pixels: entries of every v and h table. */
  readonly width: number;
  readonly height: number;
  /** Smallest and largest exported h and v entry (sign convention applied, wrapped when a register width is given). */
  readonly min: number;
  readonly max: number;
  /** Half tables: available when h[H−1−r] = −h[r] (v[W−1−c] = −v[c]) in every frame. */
  readonly halfH: Availability;
  readonly halfV: Availability;
  /** For every frame, the stored frame that holds it when identical frames share storage. */
  readonly frameIndex: readonly number[];
  /** For every stored frame, the frames it holds, first one first. */
  readonly storedFrames: readonly (readonly number[])[];
}

/** A shift in the chosen sign convention: as computed for "shift", negated for "scroll" (never negative zero). */
export function signedValue(s: number, sign: Sign): number {
  return sign === "scroll" && s !== 0 ? -s : s;
}

/** A shift as exported: in the sign convention, then wrapped modulo 2^registerBits into an unsigned register value when a width is given. */
export function exportedValue(s: number, sign: Sign, registerBits: number | null): number {
  const x = signedValue(s, sign);
  if (registerBits === null) return x;
  const m = 2 ** registerBits;
  return ((x % m) + m) % m;
}

function antisymmetry(frames: readonly FrameTables[], key: "h" | "v"): Availability {
  const what = key === "h" ? "row" : "column";
  const checked = new Set<Int32Array>(); // frames share tables: check each distinct one once
  for (const f of frames) {
    const t = f[key];
    if (checked.has(t)) continue;
    checked.add(t);
    const n = t.length;
    for (let i = 0; i < n >> 1; i++) {
      const j = n - 1 - i;
      if (t[j] !== -t[i])
        return {
          available: false,
          reason: `${key} is not antisymmetric: frame ${f.index} has ${key}[${i}] = ${t[i]} but ${key}[${j}] = ${t[j]}, not ${-t[i] || 0}`,
        };
    }
    if (n % 2 === 1 && t[n >> 1] !== 0)
      return {
        available: false,
        reason: `${key} is not antisymmetric: frame ${f.index} has ${key}[${n >> 1}] = ${t[n >> 1]} on the middle ${what}, not 0`,
      };
  }
  return { available: true, reason: `${key}[${key === "h" ? "H" : "W"}−1−i] = −${key}[i] in every frame` };
}

/** Analyses already made, by tables and then by sign and register width: an export's budget and layout share one. */
const analyses = new WeakMap<CompiledTables<FrameTables>, Map<string, ExportAnalysis>>();

/**
 * Looks at every compiled frame once: range of the exported values, antisymmetry of h and v, and which frames are
 * identical. Frames share tables (one per coefficient from compileShifts), so each distinct table is read once; and
 * the same tables under the same sign and register width are analysed once (the result is read-only).
 */
export function analyseExport(tables: CompiledTables<FrameTables>, sign: Sign, registerBits: number | null): ExportAnalysis {
  let bySettings = analyses.get(tables);
  if (bySettings === undefined) {
    bySettings = new Map();
    analyses.set(tables, bySettings);
  }
  const key = `${sign} ${registerBits}`;
  let analysis = bySettings.get(key);
  if (analysis === undefined) {
    analysis = analyse(tables, sign, registerBits);
    bySettings.set(key, analysis);
  }
  return analysis;
}

function analyse(tables: CompiledTables<FrameTables>, sign: Sign, registerBits: number | null): ExportAnalysis {
  const { frames, effect } = tables;
  let min = 0;
  let max = 0;
  // A number for each distinct table content: equal tables in different arrays still count as equal.
  const contentIds = new Map<string, number>();
  const tableIds = new Map<Int32Array, number>();
  const idOf = (t: Int32Array): number => {
    let id = tableIds.get(t);
    if (id === undefined) {
      for (let i = 0; i < t.length; i++) {
        const x = exportedValue(t[i], sign, registerBits);
        if (x < min) min = x;
        if (x > max) max = x;
      }
      const text = t.join(",");
      id = contentIds.get(text);
      if (id === undefined) {
        id = contentIds.size;
        contentIds.set(text, id);
      }
      tableIds.set(t, id);
    }
    return id;
  };
  const seen = new Map<string, number>();
  const frameIndex: number[] = [];
  const storedFrames: number[][] = [];
  for (const f of frames) {
    const key = `${f.flip ? 1 : 0} ${f.alpha} ${f.beta}|h${idOf(f.h)}|v${idOf(f.v)}`;
    let u = seen.get(key);
    if (u === undefined) {
      u = storedFrames.length;
      seen.set(key, u);
      storedFrames.push([]);
    }
    frameIndex.push(u);
    storedFrames[u].push(f.index);
  }
  return {
    frames: frames.length,
    width: effect.canvas.width,
    height: effect.canvas.height,
    min,
    max,
    halfH: antisymmetry(frames, "h"),
    halfV: antisymmetry(frames, "v"),
    frameIndex,
    storedFrames,
  };
}
