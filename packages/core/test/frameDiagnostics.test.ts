import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { Renderer, compileFrame, frameDiagnostics, parseEffect, type Effect, type FrameTables } from "../src/index.ts";
import { firstFrame, smallEffect } from "./helpers/arbitraries.ts";
import { frameDiagnostics as baselineDiagnostics } from "../bench/baseline/frameDiagnostics.ts";
import { expectClose } from "./helpers/expectClose.ts";
import { distinctPlane, idealCentre, refPath } from "./helpers/reference.ts";

/**
 * Measures a frame independently: renders distinct pixels, finds each one again, and compares its centre with the ideal
 * turn by θn about the pivot (spec §1, §6); pixels whose reference path crosses an edge are counted, not measured.
 */
function measure(e: Effect, frame: FrameTables, mask?: Uint8Array) {
  const { width: W, height: H } = e.canvas;
  const src = distinctPlane(W, H);
  const out = new Renderer(W, H, Uint32Array).render(src, frame, { ...e, edges: "wrap" });
  const at = new Map<number, number>();
  out.forEach((value, i) => at.set(value, i));
  let crossed = 0;
  let max = 0;
  let sum = 0;
  let n = 0;
  for (let r = 0; r < H; r++)
    for (let c = 0; c < W; c++) {
      if (mask && !mask[r * W + c]) continue;
      if (refPath(c, r, frame, e).crossed) {
        crossed++;
        continue;
      }
      const i = at.get(src[r * W + c])!;
      const ideal = idealCentre(c, r, frame.degrees, e.pivot);
      const d = Math.hypot((i % W) + 0.5 - ideal.x, Math.floor(i / W) + 0.5 - ideal.y);
      max = Math.max(max, d);
      sum += d;
      n++;
    }
  return { crossed, maxErrorPx: max, meanErrorPx: n ? sum / n : 0 };
}

describe("frameDiagnostics (spec §6)", () => {
  it("error is 0 at 0°, at 90° about a pixel centre and at 180° (derived by hand: these turns are exact)", () => {
    const centre = parseEffect({ canvas: { width: 32, height: 32 }, pivot: { x: 15.5, y: 15.5 }, angles: { list: [0] } });
    const edge = parseEffect({ canvas: { width: 32, height: 32 }, pivot: { x: 16, y: 16 }, angles: { list: [0] } });
    for (const [e, degrees] of [
      [centre, 0],
      [edge, 0],
      [centre, 90],
      [centre, -90],
      [centre, 180],
      [edge, 180],
    ] as const) {
      const d = frameDiagnostics(compileFrame(e, 0, degrees), e);
      // cos 90° is 6e−17 in floating point, so allow for that; at 0° the error is exactly 0.
      expectClose(d.maxErrorPx, 0, 1e-12, `max error at ${degrees}° about (${e.pivot.x}, ${e.pivot.y})`);
      expectClose(d.meanErrorPx, 0, 1e-12, `mean error at ${degrees}° about (${e.pivot.x}, ${e.pivot.y})`);
      if (degrees === 0) expect([d.maxErrorPx, d.meanErrorPx, d.wrapped]).toEqual([0, 0, 0]);
    }
  });

  it("max and mean error, wrapped and clipped equal an independent measurement of the rendered frame, with or without a mask", () => {
    fc.assert(
      fc.property(smallEffect(), fc.option(fc.array(fc.boolean(), { minLength: 400, maxLength: 400 })), (e, bits) => {
        const f = firstFrame(e);
        fc.pre(f !== undefined);
        const mask = bits ? Uint8Array.from({ length: e.canvas.width * e.canvas.height }, (_, i) => (bits[i] ? 1 : 0)) : undefined;
        const d = frameDiagnostics(f!, e, mask);
        const m = measure(e, f!, mask);
        expectClose(d.maxErrorPx, m.maxErrorPx, 1e-9, "maxErrorPx");
        expectClose(d.meanErrorPx, m.meanErrorPx, 1e-9, "meanErrorPx");
        expect(e.edges === "wrap" ? [d.wrapped, d.clipped] : [d.clipped, d.wrapped]).toEqual([m.crossed, 0]);
      }),
      { numRuns: 150 },
    );
  });

  it("the error stays within the worst case of three roundings, derived by hand from spec §4–§5", () => {
    // Pass errors e1, e2, e3 (each ≤ 1/2 px from rounding) add up to an x error e1·(1 + αβ) + α·e2 + e3 with
    // 1 + αβ = cos θr, and a y error β·e1 + e2. Coefficient quantisation adds |coordinate|·2^−(F+1) per pass: with F = 12
    // and content within 15 px of the pivot (under 25 px in any pass) that is under 0.01 px each.
    const e = parseEffect({
      canvas: { width: 48, height: 48 },
      pivot: { x: 24, y: 24 },
      angles: { list: [0] },
      fixedPoint: { bits: 16, fraction: 12 },
    });
    const mask = new Uint8Array(48 * 48);
    for (let r = 14; r < 34; r++) for (let c = 14; c < 34; c++) mask[r * 48 + c] = 1;
    for (let degrees = -180; degrees < 180; degrees += 7) {
      const f = compileFrame(e, 0, degrees);
      const t = (f.residualDegrees * Math.PI) / 180;
      const alpha = Math.abs(Math.tan(t / 2));
      const ex = 0.5 * Math.abs(Math.cos(t)) + 0.5 * alpha + 0.5 + 0.03;
      const ey = 0.5 * Math.abs(Math.sin(t)) + 0.5 + 0.02;
      const d = frameDiagnostics(f, e, mask);
      expect(d.wrapped, `${degrees}°`).toBe(0);
      expect(d.maxErrorPx, `${degrees}°`).toBeLessThanOrEqual(Math.hypot(ex, ey));
      expect(d.meanErrorPx, `${degrees}°`).toBeLessThanOrEqual(d.maxErrorPx);
    }
  });

  it("a mask restricts the measurement and the counts to its pixels", () => {
    const e = parseEffect({ canvas: { width: 12, height: 10 }, pivot: { x: 6, y: 5 }, angles: { list: [0] }, edges: "clip" });
    const f = compileFrame(e, 0, 37);
    const mask = new Uint8Array(120);
    [0, 11, 55, 64, 119, 60].forEach((i) => (mask[i] = 1));
    const d = frameDiagnostics(f, e, mask);
    const m = measure(e, f, mask);
    expect(d.clipped).toBe(m.crossed);
    expect(d.clipped).toBeGreaterThan(0); // the corners leave a 12 × 10 canvas at 37°
    expect(d.clipped).toBeLessThan(6);
    expectClose(d.maxErrorPx, m.maxErrorPx, 1e-9);
    expectClose(d.meanErrorPx, m.meanErrorPx, 1e-9);
    const one = new Uint8Array(120);
    one[5 * 12 + 6] = 1; // the pixel just right of and below the pivot
    const single = frameDiagnostics(f, e, one);
    expectClose(single.meanErrorPx, single.maxErrorPx, 1e-12);
    expect(single.clipped).toBe(0);
  });

  it("an empty mask measures nothing: all zero", () => {
    const e = parseEffect({ canvas: { width: 5, height: 5 }, pivot: { x: 2.5, y: 2.5 }, angles: { list: [0] } });
    expect(frameDiagnostics(compileFrame(e, 0, 45), e, new Uint8Array(25))).toEqual({
      maxErrorPx: 0,
      meanErrorPx: 0,
      wrapped: 0,
      clipped: 0,
    });
  });

  it("rejects a mask of the wrong size, naming both sizes", () => {
    const e = parseEffect({ canvas: { width: 5, height: 4 }, pivot: { x: 2.5, y: 2 }, angles: { list: [0] } });
    expect(() => frameDiagnostics(compileFrame(e, 0, 45), e, new Uint8Array(21))).toThrow(/21.*20/);
  });
});

describe("frameDiagnostics against the implementation it replaced (bench/baseline, before issue 10)", () => {
  // Angles that really turn: multiples of 1/8° in ±720°, and the edges of the half-turn rule (spec §2).
  const angle = fc.oneof(
    fc.integer({ min: -5760, max: 5760 }).map((n) => n / 8),
    fc.constantFrom(0, 90, -90, 90.0001, -90.0001, 90.5, -90.5, 179.9, -179.9, 180, -180),
  );
  // Centred pivots (where the half of the rows is measured and mirrored) and any other pivot, odd and even sizes.
  const effect = fc
    .record({
      width: fc.integer({ min: 1, max: 90 }),
      height: fc.integer({ min: 1, max: 90 }),
      centred: fc.boolean(),
      px: fc.nat(),
      py: fc.nat(),
      fraction: fc.integer({ min: 0, max: 15 }),
      rounding: fc.constantFrom("nearest-away", "nearest-up", "floor", "trunc"),
      halfTurn: fc.constantFrom("flip", "shear"),
      edges: fc.constantFrom("wrap", "clip"),
      group: fc.nat(),
    })
    .map((r) =>
      parseEffect({
        canvas: { width: r.width, height: r.height },
        pivot: r.centred ? { x: r.width / 2, y: r.height / 2 } : { x: (r.px % (2 * r.width + 1)) / 2, y: (r.py % (2 * r.height + 1)) / 2 },
        angles: { list: [0] },
        fixedPoint: { bits: 16, fraction: r.fraction },
        rounding: r.rounding,
        halfTurn: r.halfTurn,
        edges: r.edges,
        columnGroup: (r.group % r.width) + 1,
      }),
    );
  // No mask, a mask symmetric about the centre (mirrored halves) or any mask.
  const maskKind = fc.constantFrom("none", "symmetric", "any");

  it("gives the same max error, wrapped and clipped bit for bit, and the mean within 1e-9 px", () => {
    let mirrored = 0;
    fc.assert(
      fc.property(effect, angle, maskKind, fc.integer(), (e, degrees, kind, seed) => {
        let f: FrameTables;
        try {
          f = compileFrame(e, 0, degrees);
        } catch {
          return; // shifts beyond int32 (a huge shear without the flip): no frame to measure
        }
        const { width: W, height: H } = e.canvas;
        let mask: Uint8Array | undefined;
        if (kind !== "none") {
          mask = new Uint8Array(W * H);
          for (let i = 0; i < W * H; i++) mask[i] = ((seed ^ (i * 2654435761)) >>> 7) & 1;
          if (kind === "symmetric") for (let i = 0; i < W * H; i++) mask[W * H - 1 - i] = mask[i];
        }
        if (e.pivot.x * 2 === W && e.pivot.y * 2 === H) mirrored++;
        const got = frameDiagnostics(f, e, mask);
        const want = baselineDiagnostics(f, e, mask);
        expect([got.maxErrorPx, got.wrapped, got.clipped]).toEqual([want.maxErrorPx, want.wrapped, want.clipped]);
        expectClose(got.meanErrorPx, want.meanErrorPx, 1e-9, "meanErrorPx");
      }),
      { numRuns: 600 },
    );
    expect(mirrored).toBeGreaterThan(100);
  });

  it("holds on canvases up to 4096 pixels wide, where the rounding bound of the mirrored rows is widest", () => {
    for (const [width, height] of [
      [4096, 6],
      [4095, 9],
      [6, 4096],
      [1920, 32],
    ])
      for (const degrees of [0.125, 7, 30, 45, 89.875, 90, 135.5, 180, -100.25]) {
        const e = parseEffect({ canvas: { width, height }, pivot: { x: width / 2, y: height / 2 }, angles: { list: [degrees] } });
        const f = compileFrame(e, 0, degrees);
        const got = frameDiagnostics(f, e);
        const want = baselineDiagnostics(f, e);
        expect([got.maxErrorPx, got.wrapped, got.clipped], `${width}×${height} at ${degrees}°`).toEqual([
          want.maxErrorPx,
          want.wrapped,
          want.clipped,
        ]);
        expectClose(got.meanErrorPx, want.meanErrorPx, 1e-9, `${width}×${height} at ${degrees}°`);
      }
  });
});
