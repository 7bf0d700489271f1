import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { ROUNDINGS, compileFrame, compileShifts, compileTables, parseEffect, type Bits } from "../src/index.ts";
import { turningAngle } from "./helpers/arbitraries.ts";
import { refFrames, refTables } from "./helpers/reference.ts";

const effect = (doc: Record<string, unknown>) => parseEffect(doc);

describe("compileTables (spec §2–§4, §8)", () => {
  it("compiles every frame of the track with θn, θr, flip, kα, kβ and tables from the spec's formulas", () => {
    const e = effect({ canvas: { width: 6, height: 5 }, pivot: { x: 3, y: 2.5 }, angles: { list: [30, 150, -200, 0] } });
    const tables = compileTables(e);
    expect(tables.effect).toBe(e);
    expect(tables.frames.map((f) => [f.index, f.degrees, f.residualDegrees, f.flip])).toEqual([
      [0, 30, 30, false],
      [1, 150, -30, true],
      [2, 160, -20, true],
      [3, 0, 0, false],
    ]);
    // kα, kβ at ±30° in Q8.8: ∓69, ±128 (derived by hand: tan 15° ≈ 0.26795 → 68.6, sin 30° = 1/2 → 128).
    expect([tables.frames[0].alpha, tables.frames[0].beta]).toEqual([-69, 128]);
    expect([tables.frames[1].alpha, tables.frames[1].beta]).toEqual([69, -128]);
    for (const f of tables.frames) {
      const ref = refTables(f.alpha, f.beta, 6, 5, e.pivot, 8, "nearest-away");
      expect(Array.from(f.h)).toEqual(ref.h);
      expect(Array.from(f.v)).toEqual(ref.v);
      const all = [...ref.h, ...ref.v].map(Math.abs);
      expect(f.maxAbsShift).toBe(Math.max(...all));
    }
  });

  it("a sweep of 0° → 360° in 4 frames is 0, 90, 180 (flip, residual 0), −90", () => {
    const e = effect({ canvas: { width: 4, height: 4 }, pivot: { x: 2, y: 2 }, angles: { sweep: { from: 0, to: 360, frames: 4 } } });
    const f = compileShifts(e).frames;
    expect(f.map((x) => [x.degrees, x.residualDegrees, x.flip])).toEqual([
      [0, 0, false],
      [90, 90, false],
      [180, 0, true],
      [-90, -90, false],
    ]);
    // The flipped half turn needs no shear at all.
    expect([f[2].alpha, f[2].beta, f[2].maxAbsShift]).toEqual([0, 0, 0]);
  });

  it("elementType covers every frame: 90° on 254 columns about the middle needs ±127 (int8), on 256 columns ±128 (int16)", () => {
    // At 90° kβ = 2^F, so v[c] = R(u_c/2) = R(c + 1/2 − px): the far columns reach ±(W/2 − 1/2) → ±127 or ±128 half away
    // from zero (derived by hand). A 0° frame in the same track does not change the answer.
    const narrow = effect({ canvas: { width: 254, height: 2 }, pivot: { x: 127, y: 1 }, angles: { list: [0, 90] } });
    const wide = effect({ canvas: { width: 256, height: 2 }, pivot: { x: 128, y: 1 }, angles: { list: [0, 90] } });
    expect(compileShifts(narrow).frames[1].maxAbsShift).toBe(127);
    expect(compileShifts(narrow).elementType).toBe("int8");
    expect(compileShifts(wide).frames[1].maxAbsShift).toBe(128);
    expect(compileShifts(wide).elementType).toBe("int16");
    expect(compileTables(wide).elementType).toBe("int16");
  });

  it("elementType is int32 when a saturated 16-bit shear near 180° asks for shifts beyond int16 (derived by hand)", () => {
    // halfTurn "shear" at 179.5° saturates kα to −32768 in Q8.8: h[r] = R(−32768·v_r/512) = −64·v_r; rows 600 half-pixels
    // from the pivot shift by 38400 > 32767.
    const e = effect({ canvas: { width: 2, height: 601 }, pivot: { x: 1, y: 0 }, angles: { list: [179.5] }, halfTurn: "shear" });
    const f = compileShifts(e);
    expect(f.frames[0].saturated).toBe(true);
    expect(f.frames[0].h[300]).toBe(-64 * 601);
    expect(f.elementType).toBe("int32");
  });

  it("refuses tables no element type holds instead of wrapping them: bits 32, fraction 0, 180° by shear (spec §4)", () => {
    // kα saturates to −2^31; row 1 sits 3 half-pixels below a pivot at y = 0, so h[1] = R(−2^31·3/2) = −3·2^30 < −2^31.
    const e = effect({
      canvas: { width: 2, height: 2 },
      pivot: { x: 0, y: 0 },
      angles: { list: [180] },
      fixedPoint: { bits: 32, fraction: 0 },
      halfTurn: "shear",
    });
    expect(() => compileShifts(e)).toThrow(/-3221225472.*int32/);
  });

  it("compileFrame compiles one frame by its own angle", () => {
    const e = effect({ canvas: { width: 3, height: 3 }, pivot: { x: 1.5, y: 1.5 }, angles: { list: [0] } });
    const f = compileFrame(e, 7, 450);
    expect([f.index, f.degrees, f.residualDegrees, f.flip, f.alpha, f.beta]).toEqual([7, 90, 90, false, -256, 256]);
  });

  it("a mask passed to compileTables reaches the diagnostics", () => {
    const e = effect({ canvas: { width: 8, height: 8 }, pivot: { x: 4, y: 4 }, angles: { list: [45] } });
    const mask = new Uint8Array(64);
    const whole = compileTables(e).frames[0];
    const none = compileTables(e, { mask }).frames[0];
    expect(whole.wrapped).toBeGreaterThan(0);
    expect([none.wrapped, none.maxErrorPx, none.meanErrorPx]).toEqual([0, 0, 0]);
  });
});

describe("compileShifts, with its tables shared between frames, equals the BigInt reference on every frame", () => {
  it("for tracks of turning angles, few fraction bits (many exact halves), every rounding rule, pivot and column group", () => {
    fc.assert(
      fc.property(
        fc.record({
          W: fc.integer({ min: 1, max: 24 }),
          H: fc.integer({ min: 1, max: 24 }),
          px: fc.nat(),
          py: fc.nat(),
          g: fc.nat(),
          F: fc.integer({ min: 0, max: 5 }),
          bits: fc.constantFrom<Bits>(8, 16),
          rounding: fc.constantFrom(...ROUNDINGS),
          angles: fc.array(turningAngle, { minLength: 1, maxLength: 12 }),
        }),
        ({ W, H, px, py, g, F, bits, rounding, angles }) => {
          const e = parseEffect({
            canvas: { width: W, height: H },
            pivot: { x: (px % (2 * W + 1)) / 2, y: (py % (2 * H + 1)) / 2 },
            // Repeat the track so that frames share tables.
            angles: { list: [...angles, ...angles] },
            fixedPoint: { bits, fraction: F },
            rounding,
            columnGroup: (g % W) + 1,
          });
          for (const f of compileShifts(e).frames) {
            const ref = refTables(f.alpha, f.beta, W, H, e.pivot, F, rounding, e.columnGroup);
            expect(Array.from(f.h), `frame ${f.index} h`).toEqual(ref.h);
            expect(Array.from(f.v), `frame ${f.index} v`).toEqual(ref.v);
          }
        },
      ),
      { numRuns: 200 },
    );
  });
});

describe("every frame's angles, flip and coefficients equal the spec's reading (refFrames: 60-digit tan and sin)", () => {
  it("for tracks of turning angles, boundary angles included, in every format and half-turn rule", () => {
    fc.assert(
      fc.property(
        fc.array(turningAngle, { minLength: 1, maxLength: 6 }),
        fc.constantFrom<Bits>(8, 16, 32),
        fc.nat(),
        fc.constantFrom("flip" as const, "shear" as const),
        (angles, bits, f, halfTurn) => {
          // A half turn by shear asks for −tan 90°, which has no value: the core saturates it, the reference cannot say how.
          const list = angles.filter((a) => halfTurn === "flip" || Math.abs(a % 360) !== 180);
          fc.pre(list.length > 0);
          const e = parseEffect({
            canvas: { width: 3, height: 3 },
            pivot: { x: 1.5, y: 1.5 },
            angles: { list },
            fixedPoint: { bits, fraction: f % bits },
            halfTurn,
          });
          const ref = refFrames(e);
          compileShifts(e).frames.forEach((frame, i) => {
            const r = ref[i];
            expect([frame.degrees, frame.flip, frame.alpha, frame.beta, frame.saturated], `frame ${i}`).toEqual([
              r.degrees,
              r.flip,
              r.alpha,
              r.beta,
              r.saturated,
            ]);
            expect(frame.residualDegrees).toBe(r.residualDegrees);
          });
        },
      ),
      { numRuns: 150 },
    );
  });
});
