import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { ROUNDINGS, shift, type Rounding } from "../src/index.ts";
import { refShift } from "./helpers/reference.ts";

// s(k, t) = R(k·t / 2^(F+1)), spec §4. With k = 1 and F = 0 the argument of R is t/2, so odd t lands on exact halves.
describe("shift: the four rounding rules, derived by hand from spec §4", () => {
  // Columns: x = k·t/2^(F+1), then R(x) for nearest-away, nearest-up, floor, trunc (derived by hand from the definitions).
  const cases: [k: number, t: number, F: number, x: string, away: number, up: number, floor: number, trunc: number][] = [
    [1, 1, 0, "0.5", 1, 1, 0, 0],
    [1, -1, 0, "-0.5", -1, 0, -1, 0],
    [1, 3, 0, "1.5", 2, 2, 1, 1],
    [1, -3, 0, "-1.5", -2, -1, -2, -1],
    [1, -5, 1, "-1.25", -1, -1, -2, -1],
    [7, -1, 1, "-1.75", -2, -2, -2, -1],
    [11, 1, 1, "2.75", 3, 3, 2, 2],
    [-69, 14, 8, "-1.88671875", -2, -2, -2, -1],
    [128, -4, 8, "-1", -1, -1, -1, -1],
    [0, 12345, 8, "0", 0, 0, 0, 0],
    [-128, 3, 7, "-1.5", -2, -1, -2, -1],
  ];
  it.each(cases)("k=%i t=%i F=%i (x = %s)", (k, t, F, _x, away, up, floor, trunc) => {
    expect(shift(k, t, F, "nearest-away")).toBe(away);
    expect(shift(k, t, F, "nearest-up")).toBe(up);
    expect(shift(k, t, F, "floor")).toBe(floor);
    expect(shift(k, t, F, "trunc")).toBe(trunc);
  });

  it("never returns negative zero", () => {
    for (const rounding of ROUNDINGS) expect(Object.is(shift(1, -1, 2, rounding), -0)).toBe(false);
  });
});

describe("shift: exact for every allowed coefficient and coordinate (BigInt reference written from spec §4)", () => {
  const rounding = fc.constantFrom<Rounding>(...ROUNDINGS);
  it("agrees with exact integer arithmetic over the full 32-bit coefficient range and 4096-pixel canvases", () => {
    fc.assert(
      fc.property(
        fc.integer({ min: -(2 ** 31), max: 2 ** 31 - 1 }),
        fc.integer({ min: -8192, max: 8192 }),
        fc.integer({ min: 0, max: 31 }),
        rounding,
        (k, t, F, R) => shift(k, t, F, R) === refShift(k, t, F, R),
      ),
      { numRuns: 2000 },
    );
  });

  it("agrees on exact halves, where the rules differ", () => {
    // k·t = (2m + 1)·2^F makes x = m + 1/2 exactly.
    fc.assert(
      fc.property(fc.integer({ min: -3000, max: 3000 }), fc.integer({ min: 0, max: 12 }), rounding, (m, F, R) => {
        const k = 2 ** F;
        const t = 2 * m + 1;
        return shift(k, t, F, R) === refShift(k, t, F, R);
      }),
      { numRuns: 500 },
    );
  });
});

describe("shift: symmetry", () => {
  const anyShift = fc.tuple(
    fc.integer({ min: -(2 ** 31), max: 2 ** 31 - 1 }),
    fc.integer({ min: -8192, max: 8192 }),
    fc.integer({ min: 0, max: 31 }),
  );

  it.each(["nearest-away", "trunc"] as const)("%s is symmetric: s(k, −t) = −s(k, t) (spec §4)", (rounding) => {
    fc.assert(
      fc.property(anyShift, ([k, t, F]) => shift(k, -t, F, rounding) === -shift(k, t, F, rounding)),
      { numRuns: 1000 },
    );
  });

  it.each(["nearest-up", "floor"] as const)("%s is not symmetric: at x = ±1/2 the two sides differ (derived by hand)", (rounding) => {
    // nearest-up: floor(1/2 + 1/2) = 1 but floor(−1/2 + 1/2) = 0; floor: floor(1/2) = 0 but floor(−1/2) = −1.
    expect(shift(1, -1, 0, rounding)).not.toBe(-shift(1, 1, 0, rounding));
  });
});
