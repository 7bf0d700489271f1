/**
 * A pool of Node `worker_threads` workers for diagnostics, used by compileTables (and so by the CLI) on large tracks.
 *
 * The calling thread blocks until every frame is measured (compileTables stays synchronous) and takes its own share of
 * the work meanwhile: it hands frame ranges to the workers that are ready, measures other ranges itself, reads answers
 * with `receiveMessageOnPort` between them, and sleeps in `Atomics.wait` only when nothing is left but the workers'
 * ranges. A worker speaks the diagnostics protocol (./protocol.ts, the same handler a browser worker runs) and bumps a
 * shared counter after each message so that the sleeping thread wakes. Workers start on first use, stay for the next
 * call and never keep the process alive (unref).
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
import { DIAGNOSTICS_ERROR, DIAGNOSTICS_RESULT, diagnosticsRequest, type DiagnosticsResponse } from "./protocol.ts";

/** Type tag a worker posts once it has loaded and listens. */
export const WORKER_READY = "skewsmith.diagnostics/ready";
/** Type tag a worker posts when it could not load. */
export const WORKER_FAILED = "skewsmith.diagnostics/failed";

/** Ranges in flight per worker: one to work on and one waiting, so a worker never idles while the caller measures. */
const IN_FLIGHT = 2;

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
  ready: boolean;
  dead: boolean;
  /** Request id → [range index, time posted]. */
  readonly pending: Map<number, readonly [number, number]>;
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
 * Runs diagnostics requests on worker threads, the caller taking its share (see the module comment). nodePool makes
 * the process's one; another is for tests (say, of workers that fail to start).
 */
export class DiagnosticsPool {
  private readonly workers: PoolWorker[] = [];
  /** Bumped by every worker after every message it posts. */
  private readonly signal = new Int32Array(new SharedArrayBuffer(4));
  private nextId = 1;
  private readonly b: Builtins;

  /** A pool whose workers run `entry` (default: the worker module beside this one); throws where there are no worker threads. */
  constructor(private readonly entry: WorkerEntry) {
    const b = builtins();
    if (b === null) throw new RangeError("worker threads: not available here (no process.getBuiltinModule)");
    this.b = b;
  }

  /** Starts workers until `count` are alive (never more than asked for); they load while the caller does other work. */
  grow(count: number): void {
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
      this.workers.push({ worker, port: port1, ready: false, dead: false, pending: new Map() });
    }
  }

  /** Stops every worker (the pool starts new ones when used again). */
  close(): void {
    for (const w of this.workers) {
      w.dead = true;
      w.port.close();
      void w.worker.terminate();
    }
    this.workers.length = 0;
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
    this.grow(workers);
    const team = this.workers.filter((w) => !w.dead).slice(0, workers);
    // Answers to an earlier call that ended early (it threw) are not this call's: their ids are forgotten.
    for (const w of team) w.pending.clear();
    // Shared memory: every request carries a view of it, so the mask is copied once, not once per range.
    let shared: Uint8Array | undefined;
    if (mask !== undefined) {
      shared = new Uint8Array(new SharedArrayBuffer(mask.length));
      shared.set(mask);
    }
    const results: (FramesDiagnostics | undefined)[] = new Array(ranges.length);
    const queue = ranges.map((_, i) => i);
    let done = 0;
    let slowestLocal = 0;
    const finish = (i: number, result: FramesDiagnostics) => {
      if (results[i] === undefined) done++;
      results[i] = result;
    };
    const receive = () => {
      for (const w of team) {
        if (w.dead) continue;
        for (let m = this.b.threads.receiveMessageOnPort(w.port); m !== undefined; m = this.b.threads.receiveMessageOnPort(w.port)) {
          const data = m.message as DiagnosticsResponse | { type: string; id?: number; message?: string };
          if (data.type === WORKER_READY) w.ready = true;
          else if (data.type === WORKER_FAILED) this.retire(w, queue);
          else if (data.type === DIAGNOSTICS_RESULT || data.type === DIAGNOSTICS_ERROR) {
            const id = (data as DiagnosticsResponse).id;
            const entry = w.pending.get(id);
            if (entry === undefined) continue;
            w.pending.delete(id);
            // A worker's error (which the same request would raise here too) is measured here, to throw it here.
            if (data.type === DIAGNOSTICS_RESULT) finish(entry[0], data as FramesDiagnostics);
            else queue.push(entry[0]);
          }
        }
      }
    };
    const feed = () => {
      for (const w of team) {
        while (w.ready && !w.dead && w.pending.size < IN_FLIGHT && queue.length > 0) {
          const i = queue.shift()!;
          const id = this.nextId++;
          w.pending.set(id, [i, performance.now()]);
          w.port.postMessage(diagnosticsRequest(effect, ranges[i], { id, mask: shared }));
        }
      }
    };
    const checkStalls = () => {
      const now = performance.now();
      for (const w of team)
        for (const [, posted] of w.pending.values())
          if (now - posted > Math.max(STALL_MIN_MS, STALL_FACTOR * slowestLocal)) {
            this.retire(w, queue);
            break;
          }
    };
    while (done < ranges.length) {
      receive();
      feed();
      const i = queue.pop();
      if (i !== undefined) {
        if (results[i] !== undefined) continue;
        const start = performance.now();
        finish(i, local(ranges[i]));
        slowestLocal = Math.max(slowestLocal, performance.now() - start);
        continue;
      }
      if (done === ranges.length) break;
      // Nothing left here but ranges in flight: sleep until a worker posts (or a second passes, to look for stalls).
      const seen = Atomics.load(this.signal, 0);
      receive();
      if (done < ranges.length && queue.length === 0) {
        Atomics.wait(this.signal, 0, seen, 1000);
        checkStalls();
      }
    }
    return results as FramesDiagnostics[];
  }

  /** Gives a worker up: its ranges go back to the queue, and it is stopped. */
  private retire(w: PoolWorker, queue: number[]): void {
    if (w.dead) return;
    w.dead = true;
    for (const [i] of w.pending.values()) queue.push(i);
    w.pending.clear();
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
