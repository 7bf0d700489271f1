import { MessageChannel, type MessagePort } from "node:worker_threads";
import fc from "fast-check";
import { afterAll, describe, expect, it } from "vitest";
import {
  DIAGNOSTICS_ERROR,
  DIAGNOSTICS_REQUEST,
  DIAGNOSTICS_RESULT,
  compileTables,
  diagnoseFrames,
  diagnosticsRequest,
  handleDiagnosticsRequest,
  mergeDiagnostics,
  parseEffect,
  requestDiagnostics,
  serveDiagnostics,
  splitFrames,
  type DiagnosticsPort,
  type DiagnosticsResponse,
  type FramesDiagnostics,
} from "../../src/index.ts";

const effect = parseEffect({
  canvas: { width: 40, height: 30 },
  pivot: { x: 20, y: 15 },
  angles: { sweep: { from: -200, to: 200, frames: 24 } },
  edges: "clip",
});
const whole = compileTables(effect, { workers: 0 });

/** The frames of a result as plain objects, to compare with compileTables' frames. */
const framesOf = (d: FramesDiagnostics) =>
  Array.from(d.maxErrorPx, (_, i) => ({
    index: d.start + i,
    maxErrorPx: d.maxErrorPx[i],
    meanErrorPx: d.meanErrorPx[i],
    wrapped: d.wrapped[i],
    clipped: d.clipped[i],
  }));
const expected = (start: number, end: number) =>
  whole.frames
    .slice(start, end)
    .map((f) => ({ index: f.index, maxErrorPx: f.maxErrorPx, meanErrorPx: f.meanErrorPx, wrapped: f.wrapped, clipped: f.clipped }));

describe("diagnoseFrames", () => {
  it("measures a range of frames exactly as compileTables does, bit for bit", () => {
    expect(framesOf(diagnoseFrames(effect, { start: 5, end: 17 }))).toEqual(expected(5, 17));
    expect(framesOf(diagnoseFrames(effect))).toEqual(expected(0, 24));
  });

  it("measures over a mask as compileTables does", () => {
    const mask = Uint8Array.from({ length: 1200 }, (_, i) => (i % 7 === 3 ? 1 : 0));
    const masked = compileTables(effect, { mask, workers: 0 });
    expect(framesOf(diagnoseFrames(effect, { start: 0, end: 24 }, mask))).toEqual(
      masked.frames.map((f) => ({
        index: f.index,
        maxErrorPx: f.maxErrorPx,
        meanErrorPx: f.meanErrorPx,
        wrapped: f.wrapped,
        clipped: f.clipped,
      })),
    );
  });

  it("refuses a range outside the track and a mask of the wrong size, naming the field and what is allowed", () => {
    expect(() => diagnoseFrames(effect, { start: -1, end: 3 })).toThrow("start: -1 is not allowed; allowed a whole number from 0 to 23");
    expect(() => diagnoseFrames(effect, { start: 4, end: 4 })).toThrow("end: 4 is not allowed; allowed a whole number from 5 to 24");
    expect(() => diagnoseFrames(effect, { start: 0, end: 25 })).toThrow("end: 25 is not allowed");
    expect(() => diagnoseFrames(effect, { start: 0, end: 1 }, new Uint8Array(5))).toThrow("mask: 5 pixels, expected 40×30 = 1200");
  });
});

describe("handleDiagnosticsRequest (the message protocol)", () => {
  it("answers a request with the range's diagnostics, its id, and the result buffers to transfer", () => {
    const { response, transfer } = handleDiagnosticsRequest(diagnosticsRequest(effect, { start: 3, end: 9 }, { id: 77 }));
    expect(response.type).toBe(DIAGNOSTICS_RESULT);
    expect(response.id).toBe(77);
    if (response.type !== DIAGNOSTICS_RESULT) return;
    expect(framesOf(response)).toEqual(expected(3, 9));
    expect(transfer).toEqual([response.maxErrorPx.buffer, response.meanErrorPx.buffer, response.wrapped.buffer, response.clipped.buffer]);
    // The message survives structured cloning with its buffers transferred, as postMessage sends it.
    const copy = structuredClone(response, { transfer });
    expect(framesOf(copy)).toEqual(expected(3, 9));
  });

  it.each([
    ["not an object", 42, -1, 'type: 42 is not allowed; allowed "skewsmith.diagnostics/request"'],
    ["another type", { type: "hello", id: 3 }, 3, 'type: "hello" is not allowed'],
    ["a fractional id", { ...diagnosticsRequest(effect, { start: 0, end: 1 }), id: 1.5 }, 1.5, "id: 1.5 is not allowed"],
    ["no effect", { type: DIAGNOSTICS_REQUEST, id: 1, start: 0, end: 1 }, 1, "effect: missing"],
    [
      "a canvas too wide",
      diagnosticsRequest({ ...effect, canvas: { width: 5000, height: 30 } }, { start: 0, end: 1 }, { id: 2 }),
      2,
      "effect.canvas.width: 5000 is not allowed; allowed a whole number from 1 to 4096",
    ],
    [
      "a bad rounding",
      diagnosticsRequest({ ...effect, rounding: "up" as never }, { start: 0, end: 1 }, { id: 4 }),
      4,
      'effect.rounding: "up" is not allowed',
    ],
    [
      "a range past the end",
      diagnosticsRequest(effect, { start: 20, end: 30 }, { id: 5 }),
      5,
      "end: 30 is not allowed; allowed a whole number from 21 to 24",
    ],
    [
      "a mask that is not bytes",
      { ...diagnosticsRequest(effect, { start: 0, end: 1 }, { id: 6 }), mask: [1, 0] },
      6,
      "mask: not a Uint8Array",
    ],
    ["a mask of the wrong size", diagnosticsRequest(effect, { start: 0, end: 1 }, { id: 7, mask: new Uint8Array(9) }), 7, "mask: 9 pixels"],
  ])("answers %s with an error response naming the field, and never throws", (_, message, id, text) => {
    const { response, transfer } = handleDiagnosticsRequest(message);
    expect(response.type).toBe(DIAGNOSTICS_ERROR);
    expect(response.id).toBe(id);
    if (response.type === DIAGNOSTICS_ERROR) expect(response.message).toContain(text);
    expect(transfer).toEqual([]);
  });
});

/** A Node MessagePort with the browser's event methods (its listeners get the data itself, not an event). */
function browserLike(port: MessagePort): DiagnosticsPort {
  const wrapped = new Map<(event: { readonly data: unknown }) => void, (data: unknown) => void>();
  return {
    addEventListener: (_type, listener) => {
      const l = (data: unknown) => listener({ data });
      wrapped.set(listener, l);
      port.on("message", l);
    },
    removeEventListener: (_type, listener) => void port.off("message", wrapped.get(listener)!),
    postMessage: (message, transfer) => port.postMessage(message, transfer),
  };
}

describe("serveDiagnostics and requestDiagnostics over a real message channel", () => {
  const { port1: asker, port2: server } = new MessageChannel();
  afterAll(() => {
    asker.close();
    server.close();
  });
  serveDiagnostics(browserLike(server));
  const port1 = browserLike(asker);

  it("answers several requests in flight at once, each by its id, and the merged ranges equal the whole track", async () => {
    const parts = splitFrames(24, 5);
    const results = await Promise.all(
      parts.map((range, i) => requestDiagnostics(port1, diagnosticsRequest(effect, range, { id: 100 + i }))),
    );
    expect(framesOf(mergeDiagnostics(results))).toEqual(expected(0, 24));
  });

  it("rejects with the worker's message when a request cannot be served", async () => {
    await expect(requestDiagnostics(port1, diagnosticsRequest(effect, { start: 0, end: 99 }, { id: 9 }))).rejects.toThrow(
      "end: 99 is not allowed",
    );
  });
});

describe("splitFrames and mergeDiagnostics", () => {
  it("split a track into consecutive, non-empty, nearly equal ranges that cover it", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 4096 }), fc.integer({ min: 1, max: 200 }), (frames, parts) => {
        const ranges = splitFrames(frames, parts);
        expect(ranges.length).toBe(Math.min(frames, parts));
        expect(ranges[0].start).toBe(0);
        expect(ranges.at(-1)!.end).toBe(frames);
        const lengths = ranges.map((r) => r.end - r.start);
        for (let i = 1; i < ranges.length; i++) expect(ranges[i].start).toBe(ranges[i - 1].end);
        expect(Math.min(...lengths)).toBeGreaterThan(0);
        expect(Math.max(...lengths) - Math.min(...lengths)).toBeLessThanOrEqual(1);
      }),
    );
  });

  it("merge results given in any order, and refuse a gap or an overlap naming the frames", () => {
    const a = diagnoseFrames(effect, { start: 0, end: 10 });
    const b = diagnoseFrames(effect, { start: 10, end: 24 });
    expect(framesOf(mergeDiagnostics([b, a]))).toEqual(expected(0, 24));
    expect(() => mergeDiagnostics([a, diagnoseFrames(effect, { start: 12, end: 24 })])).toThrow("parts: frames 10 to 11 missing");
    expect(() => mergeDiagnostics([a, diagnoseFrames(effect, { start: 8, end: 24 })])).toThrow("parts: frames 8 to 9 given twice");
  });
});

it("the response type is a union a worker's asker can tell apart by its tag", () => {
  const ok: DiagnosticsResponse = handleDiagnosticsRequest(diagnosticsRequest(effect, { start: 0, end: 1 })).response;
  const bad: DiagnosticsResponse = handleDiagnosticsRequest({}).response;
  expect([ok.type, bad.type]).toEqual([DIAGNOSTICS_RESULT, DIAGNOSTICS_ERROR]);
});
