/**
 * A pool of Node `worker_threads` workers for diagnostics, used by compileTables (and so by the CLI) on large tracks.
 *
 * A track is measured through shared memory (./sharedTrack.ts): `begin` posts the track to the workers, which take its
 * frame ranges one at a time from a shared counter and write their figures into shared arrays; `finish` has the calling
 * thread take the ranges still left, then sleep in `Atomics.wait` until the workers' last ones are in. Between the two
 * the caller may do other work (the export builds its other files meanwhile); compileTables calls both at once and
 * stays synchronous. A worker that loads late or runs slowly just takes fewer ranges. Workers start on first use (or
 * early, through `grow`), stay for the next call and never keep the process alive (unref).
 *
 * Node's modules are reached through `process.getBuiltinModule` at run time, never imported, so the modules that import
 * this one still load in a browser; there, and wherever workers cannot start, `nodePool` returns null and the caller
 * measures on its own thread.
 *
 * The worker module is found beside this one, with this module's extension: `./nodeWorker.ts` from source (the worker
 * then registers tsx's loader first, as the calling thread runs under it), `./nodeWorker.js` in a build. A build that
 * compiles file by file keeps that; a bundle emits `nodeWorker.mjs` as an entry of its own beside the file that holds
 * this code or one folder up from it (scripts/build.mjs: dist/nodeWorker.mjs, this code in dist/ or dist/chunks/),
 * else there are no workers (and no error: the calling thread measures everything).
 */
import type * as NodeFs from "node:fs";
import type * as NodeModule from "node:module";
import type * as NodeOs from "node:os";
import type * as NodeUrl from "node:url";
import type * as NodeWorkerThreads from "node:worker_threads";
import type { Effect } from "../effect.ts";
import type { FrameRange, FramesDiagnostics } from "./diagnoseFrames.ts";
import {
  closeTrack,
  measureHere,
  RANGE_FAILED,
  rangeState,
  settledRanges,
  sharedTrack,
  takeRanges,
  TRACK_REQUEST,
  waitForRanges,
  type SharedTrack,
  type TrackRequest,
} from "./sharedTrack.ts";

/** Type tag a worker posts once it has loaded and listens. */
export const WORKER_READY = "skewsmith.diagnostics/ready";
/** Type tag a worker posts when it could not load. */
export const WORKER_FAILED = "skewsmith.diagnostics/failed";

/** A worker whose range takes this much longer than the caller's slowest is given up on; its range is measured here. */
const STALL_FACTOR = 50;
/** …but never before this many milliseconds (a worker still starting, a loaded machine). */
const STALL_MIN_MS = 30_000;

interface Builtins {
  readonly threads: typeof NodeWorkerThreads;
  readonly os: typeof NodeOs;
  readonly fs: typeof NodeFs;
  readonly url: typeof NodeUrl;
  readonly module: typeof NodeModule;
}

function builtins(): Builtins | null {
  const p = (globalThis as { process?: { getBuiltinModule?: (id: string) => unknown } }).process;
  if (typeof p?.getBuiltinModule !== "function") return null;
  const get = p.getBuiltinModule.bind(p);
  const threads = get("node:worker_threads") as typeof NodeWorkerThreads | undefined;
  const os = get("node:os") as typeof NodeOs | undefined;
  const fs = get("node:fs") as typeof NodeFs | undefined;
  const url = get("node:url") as typeof NodeUrl | undefined;
  const module = get("node:module") as typeof NodeModule | undefined;
  return threads && os && fs && url && module ? { threads, os, fs, url, module } : null;
}

/** One worker of the pool, as the caller sees it. */
interface PoolWorker {
  readonly worker: NodeWorkerThreads.Worker;
  readonly port: NodeWorkerThreads.MessagePort;
  dead: boolean;
}

/** A track being measured: `finish` takes the caller's share and returns the figures, `cancel` lets it go unfinished. */
export interface PendingTrack {
  /** Measures the ranges still left with `local` on this thread, waits for the workers' ones, returns every frame's figures. */
  finish(local: (range: FrameRange) => FramesDiagnostics): FramesDiagnostics;
  /** Stops the workers taking further ranges of this track (for a caller that will not finish it). */
  cancel(): void;
}

/** Code each worker starts with: load the TypeScript loader when running from source, then the worker module. */
const BOOTSTRAP = `
const { workerData } = require("node:worker_threads");
const { port, signal, loader, entry } = workerData;
(async () => {
  if (loader) (await import(loader)).register();
  (await import(entry)).serveWorkerPort(port, signal);
})().catch((error) => {
  port.postMessage({ type: ${JSON.stringify(WORKER_FAILED)}, message: String((error && error.stack) || error) });
  Atomics.add(signal, 0, 1);
  Atomics.notify(signal, 0);
});
`;

/** The ESM entry of package `specifier` as seen from module `from`, or null when it cannot be found. */
function resolveFrom(b: Builtins, from: string, specifier: string): string | null {
  const resolve = (import.meta as { resolve?: (specifier: string) => string }).resolve;
  try {
    if (typeof resolve === "function") return resolve(specifier);
    // Where import.meta.resolve is missing (a test runner's module wrapper): the package's CommonJS entry sits beside
    // its ESM one (tsx: dist/esm/api/index.cjs and index.mjs).
    return b.url.pathToFileURL(
      b.module
        .createRequire(from)
        .resolve(specifier)
        .replace(/\.cjs$/, ".mjs"),
    ).href;
  } catch {
    return null;
  }
}

/** The worker module beside this one, with the loader it needs when it is TypeScript; null when it is not there. */
function workerEntry(b: Builtins): WorkerEntry | null {
  const here = import.meta.url;
  const ext = /\.[cm]?[jt]s$/.exec(new URL(here).pathname)?.[0];
  if (!here.startsWith("file:") || ext === undefined) return null;
  // Beside this module (from source, or a build file by file), or one folder up (this module in a bundle's chunk folder).
  const entry = [`./nodeWorker${ext}`, `../nodeWorker${ext}`]
    .map((name) => new URL(name, here))
    .find((url) => b.fs.existsSync(b.url.fileURLToPath(url)));
  if (entry === undefined) return null;
  if (!ext.endsWith("ts")) return { entry: entry.href, loader: null };
  // Running from source: the worker needs the same TypeScript loader (tsx's ESM entry) that this thread runs under.
  const loader = resolveFrom(b, here, "tsx/esm/api");
  if (loader === null) return null;
  return { entry: entry.href, loader };
}

/** Where a worker's module is (a file: URL) and the loader to register first (a file: URL), if any. */
export interface WorkerEntry {
  readonly entry: string;
  readonly loader: string | null;
}

/**
 * Measures tracks on worker threads, the caller taking its share (see the module comment). nodePool makes the process's
 * one; another is for tests (say, of workers that fail to start).
 */
export class DiagnosticsPool {
  private readonly workers: PoolWorker[] = [];
  /** Bumped by a worker after every message it posts (the worker module's contract; read by nobody here now). */
  private readonly signal = new Int32Array(new SharedArrayBuffer(4));
  private readonly b: Builtins;

  /** A pool whose workers run `entry` (default: the worker module beside this one); throws where there are no worker threads. */
  constructor(private readonly entry: WorkerEntry) {
    const b = builtins();
    if (b === null) throw new RangeError("worker threads: not available here (no process.getBuiltinModule)");
    this.b = b;
  }

  /** Starts workers until `count` are alive (never more than asked for); they load while the caller does other work. */
  grow(count: number): void {
    this.drain();
    const alive = this.workers.filter((w) => !w.dead);
    for (let i = alive.length; i < count; i++) {
      const { port1, port2 } = new this.b.threads.MessageChannel();
      const worker = new this.b.threads.Worker(BOOTSTRAP, {
        eval: true,
        workerData: { port: port2, signal: this.signal, ...this.entry },
        transferList: [port2],
      });
      worker.unref();
      port1.unref();
      this.workers.push({ worker, port: port1, dead: false });
    }
  }

  /** Reads what the workers posted: a worker that could not load is stopped (grow starts another when asked). */
  private drain(): void {
    for (const w of this.workers) {
      if (w.dead) continue;
      for (let m = this.b.threads.receiveMessageOnPort(w.port); m !== undefined; m = this.b.threads.receiveMessageOnPort(w.port))
        if ((m.message as { type?: unknown }).type === WORKER_FAILED) this.retire(w);
    }
    for (let i = this.workers.length - 1; i >= 0; i--) if (this.workers[i].dead) this.workers.splice(i, 1);
  }

  /** Stops every worker (the pool starts new ones when used again). */
  close(): void {
    for (const w of this.workers) this.retire(w);
    this.workers.length = 0;
  }

  /**
   * Starts measuring `ranges` (consecutive) of `effect` on up to `workers` worker threads, which take them one at a
   * time; the caller joins in with `finish`.
   */
  begin(effect: Effect, mask: Uint8Array | undefined, ranges: readonly FrameRange[], workers: number): PendingTrack {
    this.grow(workers);
    const team = this.workers.filter((w) => !w.dead).slice(0, workers);
    const track = sharedTrack(ranges);
    // Shared memory: the mask is copied once, not once per worker.
    let shared: Uint8Array | undefined;
    if (mask !== undefined) {
      shared = new Uint8Array(new SharedArrayBuffer(mask.length));
      shared.set(mask);
    }
    const request: TrackRequest = { type: TRACK_REQUEST, effect, ...(shared && { mask: shared }), ...track };
    for (const w of team) w.port.postMessage(request);
    return { finish: (local) => this.finish(track, team, local), cancel: () => closeTrack(track) };
  }

  private finish(track: SharedTrack, team: readonly PoolWorker[], local: (range: FrameRange) => FramesDiagnostics): FramesDiagnostics {
    const n = track.ranges.length;
    let slowestLocal = 0;
    takeRanges(
      track,
      (range) => {
        const start = performance.now();
        const result = local(range);
        slowestLocal = Math.max(slowestLocal, performance.now() - start);
        return result;
      },
      false,
    );
    // Nothing left to take: sleep until the workers' ranges are in, or give them up when they stop coming.
    let seen = settledRanges(track);
    let progress = performance.now();
    while (seen < n) {
      waitForRanges(track, seen, 1000);
      const now = settledRanges(track);
      if (now !== seen) {
        seen = now;
        progress = performance.now();
      } else if (performance.now() - progress > Math.max(STALL_MIN_MS, STALL_FACTOR * slowestLocal)) {
        for (const w of team) this.retire(w);
        for (let i = 0; i < n; i++) if (rangeState(track, i) === 0) measureHere(track, i, local);
        break;
      }
    }
    // A worker's error (which the same range raises here too) is measured here, to throw it here.
    for (let i = 0; i < n; i++) if (rangeState(track, i) === RANGE_FAILED) measureHere(track, i, local);
    return track;
  }

  /**
   * Measures every range of `ranges` of `effect`: `local(range)` on this thread, the others on up to `workers` worker
   * threads. Returns the results in the order of `ranges`. Blocks until all are in.
   */
  run(
    effect: Effect,
    mask: Uint8Array | undefined,
    ranges: readonly FrameRange[],
    workers: number,
    local: (range: FrameRange) => FramesDiagnostics,
  ): FramesDiagnostics[] {
    const all = this.begin(effect, mask, ranges, workers).finish(local);
    return ranges.map(({ start, end }) => {
      const a = start - all.start;
      const b = end - all.start;
      return {
        start,
        end,
        maxErrorPx: all.maxErrorPx.subarray(a, b),
        meanErrorPx: all.meanErrorPx.subarray(a, b),
        wrapped: all.wrapped.subarray(a, b),
        clipped: all.clipped.subarray(a, b),
      };
    });
  }

  /** Stops a worker. */
  private retire(w: PoolWorker): void {
    if (w.dead) return;
    w.dead = true;
    w.port.close();
    void w.worker.terminate();
  }
}

let pool: DiagnosticsPool | null | undefined;

/** The process's diagnostics pool, made on first use; null where worker threads are not available (a browser, a bundle without the worker module). */
export function nodePool(): DiagnosticsPool | null {
  if (pool !== undefined) return pool;
  const b = builtins();
  const entry = b ? workerEntry(b) : null;
  pool = b && entry ? new DiagnosticsPool(entry) : null;
  return pool;
}

/** How many worker threads to use by default: one less than the cores this process may use (the caller is the other). */
export function defaultWorkers(): number {
  const b = builtins();
  if (b === null) return 0;
  const cores = typeof b.os.availableParallelism === "function" ? b.os.availableParallelism() : b.os.cpus().length;
  return Math.max(0, cores - 1);
}
