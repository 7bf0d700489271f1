/**
 * The diagnostics message protocol: what a thread asks a diagnostics worker and what the worker answers. Any worker
 * speaks it: a Node `worker_threads` worker (./nodePool.ts uses one per spare core for the CLI and compileTables) or a
 * browser Web Worker. Nothing here imports Node or the DOM.
 *
 * In a browser, the whole worker module is two lines, and the page asks it with `requestDiagnostics`:
 *
 *     // diagnostics.worker.ts
 *     import { serveDiagnostics } from "@skewsmith/core";
 *     serveDiagnostics(self);
 *
 *     // the page
 *     import { diagnosticsRequest, mergeDiagnostics, requestDiagnostics, splitFrames } from "@skewsmith/core";
 *     const workers = Array.from({ length: navigator.hardwareConcurrency - 1 || 1 }, () =>
 *       new Worker(new URL("./diagnostics.worker.ts", import.meta.url), { type: "module" }));
 *     const parts = splitFrames(frameCount, workers.length);
 *     const results = await Promise.all(parts.map((range, i) => requestDiagnostics(workers[i], diagnosticsRequest(effect, range, { id: i, mask }))));
 *     const all = mergeDiagnostics(results); // all.maxErrorPx[i], all.meanErrorPx[i], all.wrapped[i], all.clipped[i] for frame i
 *
 * `new Worker(new URL(..., import.meta.url), { type: "module" })` is the form bundlers (Vite among them) recognise and
 * bundle the worker for. The result arrays are transferred, not copied. A mask is copied into each request unless it
 * lives in a SharedArrayBuffer (cross-origin isolated pages only): ask each worker once, for a range of frames.
 */
import { EDGES, HALF_TURNS, LIMITS, ROUNDINGS } from "../limits.ts";
import type { Effect } from "../effect.ts";
import { diagnoseFrames, type FrameRange, type FramesDiagnostics } from "./diagnoseFrames.ts";

/** Type tag of a request. */
export const DIAGNOSTICS_REQUEST = "skewsmith.diagnostics/request";
/** Type tag of a successful response. */
export const DIAGNOSTICS_RESULT = "skewsmith.diagnostics/result";
/** Type tag of a failed request's response. */
export const DIAGNOSTICS_ERROR = "skewsmith.diagnostics/error";

/** Asks for the diagnostics of frames start … end − 1 of a validated effect (what parseEffect returns). */
export interface DiagnosticsRequest extends FrameRange {
  readonly type: typeof DIAGNOSTICS_REQUEST;
  /** Chosen by the asker; the response carries it back. */
  readonly id: number;
  readonly effect: Effect;
  /** One byte per canvas pixel, non-zero = measured; absent: every pixel. */
  readonly mask?: Uint8Array;
}

/** The diagnostics of the frames asked for. */
export interface DiagnosticsResult extends FramesDiagnostics {
  readonly type: typeof DIAGNOSTICS_RESULT;
  readonly id: number;
}

/** A request that could not be served, and why (a message naming the field and the allowed range). */
export interface DiagnosticsError {
  readonly type: typeof DIAGNOSTICS_ERROR;
  /** The request's id, or −1 when the message had none. */
  readonly id: number;
  readonly message: string;
}

export type DiagnosticsResponse = DiagnosticsResult | DiagnosticsError;

/** What a worker posts back: the response and the buffers to transfer with it (postMessage's second argument). */
export interface DiagnosticsReply {
  readonly response: DiagnosticsResponse;
  readonly transfer: ArrayBuffer[];
}

/** Builds a request for `range` of `effect`, with the asker's id and an optional mask. */
export function diagnosticsRequest(
  effect: Effect,
  range: FrameRange,
  options: { id?: number; mask?: Uint8Array } = {},
): DiagnosticsRequest {
  return {
    type: DIAGNOSTICS_REQUEST,
    id: options.id ?? 0,
    effect,
    start: range.start,
    end: range.end,
    ...(options.mask !== undefined && { mask: options.mask }),
  };
}

/** Thrown for a message that is not a well-formed request; the message names the field and what is allowed. */
class RequestError extends Error {}

const isRecord = (x: unknown): x is Record<string, unknown> => typeof x === "object" && x !== null;

function wholeNumber(value: unknown, field: string, min: number, max: number): number {
  if (typeof value !== "number" || !Number.isInteger(value) || value < min || value > max)
    throw new RequestError(`${field}: ${JSON.stringify(value)} is not allowed; allowed a whole number from ${min} to ${max}`);
  return value;
}

function oneOf(value: unknown, field: string, allowed: readonly string[]): void {
  if (typeof value !== "string" || !allowed.includes(value))
    throw new RequestError(`${field}: ${JSON.stringify(value)} is not allowed; allowed one of ${allowed.map((a) => `"${a}"`).join(", ")}`);
}

/**
 * Checks the fields of an effect that the diagnostics read. The asker sends an effect it validated (parseEffect); this
 * catches a message built wrongly, cheaply, without the full validator in every worker.
 */
function checkEffectShape(effect: unknown): asserts effect is Effect {
  if (!isRecord(effect)) throw new RequestError("effect: missing; allowed a validated effect document");
  const { canvas, pivot, angles, fixedPoint } = effect;
  if (!isRecord(canvas)) throw new RequestError("effect.canvas: missing");
  const width = wholeNumber(canvas.width, "effect.canvas.width", LIMITS.canvas.min, LIMITS.canvas.max);
  const height = wholeNumber(canvas.height, "effect.canvas.height", LIMITS.canvas.min, LIMITS.canvas.max);
  if (!isRecord(pivot)) throw new RequestError("effect.pivot: missing");
  wholeNumber(Number(pivot.x) * 2, "effect.pivot.x × 2", 0, 2 * width);
  wholeNumber(Number(pivot.y) * 2, "effect.pivot.y × 2", 0, 2 * height);
  if (!isRecord(angles) || !(Array.isArray(angles.list) || isRecord(angles.sweep)))
    throw new RequestError("effect.angles: missing; allowed {list} or {sweep}");
  if (!isRecord(fixedPoint)) throw new RequestError("effect.fixedPoint: missing");
  if (!(LIMITS.bits as readonly unknown[]).includes(fixedPoint.bits))
    throw new RequestError(
      `effect.fixedPoint.bits: ${JSON.stringify(fixedPoint.bits)} is not allowed; allowed one of ${LIMITS.bits.join(", ")}`,
    );
  wholeNumber(fixedPoint.fraction, "effect.fixedPoint.fraction", 0, Number(fixedPoint.bits) - 1);
  oneOf(effect.rounding, "effect.rounding", ROUNDINGS);
  oneOf(effect.halfTurn, "effect.halfTurn", HALF_TURNS);
  oneOf(effect.edges, "effect.edges", EDGES);
  wholeNumber(effect.columnGroup, "effect.columnGroup", 1, width);
}

/**
 * Serves one message: the diagnostics of the frames a request asks for, or an error response that says what was wrong
 * with it. Never throws, so a worker that calls it for every message always answers.
 */
export function handleDiagnosticsRequest(message: unknown): DiagnosticsReply {
  const id = isRecord(message) && typeof message.id === "number" ? message.id : -1;
  try {
    if (!isRecord(message) || message.type !== DIAGNOSTICS_REQUEST)
      throw new RequestError(
        `type: ${JSON.stringify(isRecord(message) ? message.type : message)} is not allowed; allowed "${DIAGNOSTICS_REQUEST}"`,
      );
    wholeNumber(message.id, "id", Number.MIN_SAFE_INTEGER, Number.MAX_SAFE_INTEGER);
    checkEffectShape(message.effect);
    const mask = message.mask;
    if (mask !== undefined && !(mask instanceof Uint8Array))
      throw new RequestError("mask: not a Uint8Array; allowed one byte per canvas pixel");
    const result = diagnoseFrames(message.effect, { start: Number(message.start), end: Number(message.end) }, mask);
    const response: DiagnosticsResult = { type: DIAGNOSTICS_RESULT, id, ...result };
    const transfer = [result.maxErrorPx.buffer, result.meanErrorPx.buffer, result.wrapped.buffer, result.clipped.buffer] as ArrayBuffer[];
    return { response, transfer };
  } catch (error) {
    return { response: { type: DIAGNOSTICS_ERROR, id, message: error instanceof Error ? error.message : String(error) }, transfer: [] };
  }
}

/**
 * The side of a channel a worker answers on: a Web Worker's `self`, or anything with the same two methods (a Node
 * MessagePort through a small adapter, as ./nodeWorker.ts does: its listeners receive the data, not an event).
 */
export interface DiagnosticsEndpoint {
  addEventListener(type: "message", listener: (event: { readonly data: unknown }) => void): void;
  postMessage(message: unknown, transfer: ArrayBuffer[]): void;
}

/** Answers every message that arrives at `endpoint` with handleDiagnosticsRequest: the whole of a diagnostics worker. */
export function serveDiagnostics(endpoint: DiagnosticsEndpoint): void {
  endpoint.addEventListener("message", (event) => {
    const { response, transfer } = handleDiagnosticsRequest(event.data);
    endpoint.postMessage(response, transfer);
  });
}

/** The asking side of a channel: a browser `Worker`, or anything with the same three methods. */
export interface DiagnosticsPort extends DiagnosticsEndpoint {
  removeEventListener(type: "message", listener: (event: { readonly data: unknown }) => void): void;
}

/**
 * Posts `request` to a worker serving diagnostics and resolves with its result (rejects with its error). Several
 * requests may be in flight on one port at once, each with its own id.
 */
export function requestDiagnostics(port: DiagnosticsPort, request: DiagnosticsRequest): Promise<FramesDiagnostics> {
  return new Promise((resolve, reject) => {
    const listener = (event: { readonly data: unknown }) => {
      const data = event.data as DiagnosticsResponse;
      if (!isRecord(data) || data.id !== request.id || (data.type !== DIAGNOSTICS_RESULT && data.type !== DIAGNOSTICS_ERROR)) return;
      port.removeEventListener("message", listener);
      if (data.type === DIAGNOSTICS_RESULT) resolve(data);
      else reject(new RangeError(data.message));
    };
    port.addEventListener("message", listener);
    port.postMessage(request, []);
  });
}

/** Cuts frames 0 … frames − 1 into at most `parts` consecutive ranges of nearly equal length (none empty). */
export function splitFrames(frames: number, parts: number): FrameRange[] {
  const n = Math.max(1, Math.min(frames, Math.floor(parts)));
  return Array.from({ length: n }, (_, i) => ({ start: Math.floor((i * frames) / n), end: Math.floor(((i + 1) * frames) / n) }));
}

/** Joins results of consecutive ranges (in any order) into one, frame by frame; throws when they leave a gap or overlap. */
export function mergeDiagnostics(parts: readonly FramesDiagnostics[]): FramesDiagnostics {
  const sorted = [...parts].sort((a, b) => a.start - b.start);
  if (sorted.length === 0) throw new RangeError("parts: none; allowed at least one result");
  const start = sorted[0].start;
  const end = sorted[sorted.length - 1].end;
  const n = end - start;
  const all = {
    start,
    end,
    maxErrorPx: new Float64Array(n),
    meanErrorPx: new Float64Array(n),
    wrapped: new Uint32Array(n),
    clipped: new Uint32Array(n),
  };
  let at = start;
  for (const p of sorted) {
    if (p.start > at) throw new RangeError(`parts: frames ${at} to ${p.start - 1} missing`);
    if (p.start < at) throw new RangeError(`parts: frames ${p.start} to ${at - 1} given twice`);
    const o = p.start - start;
    all.maxErrorPx.set(p.maxErrorPx, o);
    all.meanErrorPx.set(p.meanErrorPx, o);
    all.wrapped.set(p.wrapped, o);
    all.clipped.set(p.clipped, o);
    at = p.end;
  }
  return all;
}
