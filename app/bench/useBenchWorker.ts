/** The page's side of the bench worker: one worker per bench, its results as React state, frames and exports as promises. */
import type { BudgetReport, CanvasFit, Effect, ExportOptionsInput } from "@skewsmith/core";
import { useCallback, useEffect, useMemo, useRef, useState } from "react";
import type { FramePicture, FrameWants } from "./framePainter.ts";
import type { FrameRow } from "./trackDiagnosis.ts";
import type { FrameDisplay } from "./display.ts";
import { recyclable } from "./frameFeed.ts";
import type { ExportFile, FromWorker, Loaded, ToWorker } from "./protocol.ts";
import type { Pass } from "./view.ts";

export interface WorkerState {
  generation: number;
  loaded: Loaded | null;
  /** Rows of the latest load, in frame order, as far as measured. */
  rows: FrameRow[];
  done: number;
  total: number;
  /** Milliseconds from the load to the last row, once measured. */
  diagnosedMs: number | null;
  fit: CanvasFit | null;
  error: string | null;
}

/** What a load sends besides its generation: the effect, its sprite and placement, key pixels, the fit's rounding. */
export type LoadInput = Omit<Extract<ToWorker, { type: "load" }>, "type" | "generation">;

export type FrameAnswer = {
  index: number;
  pass: Pass;
  degrees: number;
  picture: FramePicture;
  display: FrameDisplay | null;
  generation: number;
};

/** One frame as the preview wants it. */
export interface FrameAsk {
  index: number;
  pass: Pass;
  wants: FrameWants;
  zoom: number;
  shade: boolean;
}

const EMPTY: WorkerState = { generation: 0, loaded: null, rows: [], done: 0, total: 0, diagnosedMs: null, fit: null, error: null };

export function useBenchWorker() {
  const worker = useRef<Worker | null>(null);
  const [state, setState] = useState<WorkerState>(EMPTY);
  const generation = useRef(0);
  const nextId = useRef(1);
  const pending = useRef(
    new Map<
      number,
      { resolve: (value: never) => void; reject: (error: Error) => void; progress?: (done: number, total: number, step: string) => void }
    >(),
  );
  const queued = useRef<ToWorker[]>([]);

  useEffect(() => {
    const w = new Worker(new URL("./bench.worker.ts", import.meta.url), { type: "module", name: "skewsmith-bench" });
    worker.current = w;
    const rows: FrameRow[] = [];
    w.onmessage = (event: MessageEvent<FromWorker>) => {
      const m = event.data;
      const settle = (id: number, value: unknown, error: string | null) => {
        const p = pending.current.get(id);
        if (!p) return;
        pending.current.delete(id);
        if (error !== null) p.reject(new Error(error));
        else p.resolve(value as never);
      };
      switch (m.type) {
        case "loaded":
          if (m.generation !== generation.current) return;
          rows.length = 0;
          setState((s) => ({
            ...s,
            generation: m.generation,
            loaded: m,
            done: 0,
            total: m.frames,
            diagnosedMs: null,
            fit: null,
            error: null,
          }));
          break;
        case "rows":
          if (m.generation !== generation.current) return;
          rows.push(...m.rows);
          setState((s) => ({ ...s, rows: rows.slice(), done: m.done, total: m.total }));
          break;
        case "diagnosed":
          if (m.generation !== generation.current) return;
          setState((s) => ({ ...s, diagnosedMs: m.ms }));
          break;
        case "fit":
          if (m.generation !== generation.current) return;
          setState((s) => ({ ...s, fit: m.fit }));
          break;
        case "error":
          if (m.generation !== generation.current) return;
          setState((s) => ({ ...s, error: m.message }));
          break;
        case "frame":
          settle(
            m.request,
            { index: m.index, pass: m.pass, degrees: m.degrees, picture: m.picture, display: m.display, generation: m.generation },
            null,
          );
          break;
        case "budget":
          settle(m.job, m.report, m.error);
          break;
        case "export-progress":
          pending.current.get(m.job)?.progress?.(m.done, m.total, m.step);
          break;
        case "export":
          settle(m.job, m.files, m.error);
          break;
      }
    };
    for (const message of queued.current) w.postMessage(message);
    queued.current = [];
    return () => {
      w.terminate();
      worker.current = null;
    };
  }, []);

  const send = useCallback((message: ToWorker) => {
    if (worker.current) worker.current.postMessage(message);
    else queued.current.push(message);
  }, []);

  const ask = useCallback(
    <T>(make: (id: number) => ToWorker, progress?: (done: number, total: number, step: string) => void): Promise<T> =>
      new Promise<T>((resolve, reject) => {
        const id = nextId.current++;
        pending.current.set(id, { resolve: resolve as (value: never) => void, reject, progress });
        send(make(id));
      }),
    [send],
  );

  const api = useMemo(
    () => ({
      /** Loads an effect: tables at once, rows as they are measured, then the canvas-fit advice. */
      load(input: LoadInput) {
        generation.current += 1;
        // Only the latest load's replies count; queued older loads are dropped before they start.
        queued.current = queued.current.filter((m) => m.type !== "load");
        send({ type: "load", generation: generation.current, ...input });
      },
      frame: (want: FrameAsk) => ask<FrameAnswer>((request) => ({ type: "frame", request, ...want })),
      /** Hands a frame's pixel buffers back to the worker once the page no longer holds the frame. */
      recycle(answer: FrameAnswer) {
        const buffers = recyclable(answer);
        if (buffers.length > 0 && worker.current) worker.current.postMessage({ type: "recycle", buffers } satisfies ToWorker, buffers);
      },
      budget: (document: Effect, options: ExportOptionsInput) => ask<BudgetReport>((job) => ({ type: "budget", job, document, options })),
      exportFiles: (document: Effect, options: ExportOptionsInput, progress: (done: number, total: number, step: string) => void) =>
        ask<ExportFile[]>((job) => ({ type: "export", job, document, options }), progress),
    }),
    [ask, send],
  );

  return { state, ...api };
}

export type BenchWorker = ReturnType<typeof useBenchWorker>;
