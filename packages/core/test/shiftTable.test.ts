import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { ROUNDINGS, columnShifts, rowShifts, type Rounding } from "../src/index.ts";
import { refTables } from "./helpers/reference.ts";

const q88 = { fraction: 8, rounding: "nearest-away" as Rounding };

describe("row table h[r] = s(kα, 2r + 1 − P2y) (spec §4)", () => {
  it("30° on a 16-row grid, pivot on a pixel centre: rows 0 and ±1 stay, ±2…±5 move one pixel, ±6…±8 move two (spec §9, common practice)", () => {
    // Pivot on the centre of row 7 (y = 7.5), so rows 0 … 15 sit at −7 … 8 from it. kα(30°, Q8.8) = −69 (tan 15° ≈ 0.268).
    const h = Array.from(rowShifts(-69, 16, 15, q88));
    const d = h.map((_, r) => r - 7);
    for (let r = 0; r < 16; r++) {
      const expected = Math.abs(d[r]) <= 1 ? 0 : Math.abs(d[r]) <= 5 ? 1 : 2;
      expect(Math.abs(h[r]), `row ${r} at ${d[r]} from the pivot`).toBe(expected);
      // α < 0: rows below the pivot (y > 0) move left, rows above move right (x' = x + α·y).
      if (h[r] !== 0) expect(Math.sign(h[r])).toBe(-Math.sign(d[r]));
    }
    expect(h).toEqual([2, 2, 1, 1, 1, 1, 0, 0, 0, -1, -1, -1, -1, -2, -2, -2]);
  });

  it("a pivot on a pixel edge puts every row half a pixel off it: 4 rows about y = 2 with kα = −128 (−1/2 in Q8.8)", () => {
    // v_r = 2r + 1 − 4 = −3, −1, 1, 3 half-pixels; shift = R(−128·v/512) = R(3/4), R(1/4), R(−1/4), R(−3/4) (derived by hand).
    expect(Array.from(rowShifts(-128, 4, 4, q88))).toEqual([1, 0, 0, -1]);
  });

  it("with floor rounding the same rows lean one way: floor(3/4, 1/4, −1/4, −3/4) = 0, 0, −1, −1 (derived by hand)", () => {
    expect(Array.from(rowShifts(-128, 4, 4, { fraction: 8, rounding: "floor" }))).toEqual([0, 0, -1, -1]);
  });
});

describe("column table v[c] = s(kβ, 2·G·g + g − P2x) (spec §4)", () => {
  it("sin 30° = 1/2: a 30° turn shifts columns by one pixel for every two across (spec §9 rule of thumb)", () => {
    // 8 columns, pivot x = 4 (P2x = 8): u = −7, −5, …, 7 half-pixels; kβ = 128 → R(u/4) (derived by hand).
    expect(Array.from(columnShifts(128, 8, 8, 1, q88))).toEqual([-2, -1, -1, 0, 0, 1, 1, 2]);
    const wide = Array.from(columnShifts(128, 64, 64, 1, q88));
    for (let c = 0; c + 2 < 64; c++) expect(wide[c + 2] - wide[c]).toBe(1);
  });

  it("groups of 4 take the shift at the group's nominal centre: ±2 pixels from the pivot → ∓1, ±1 (derived by hand)", () => {
    expect(Array.from(columnShifts(128, 8, 8, 4, q88))).toEqual([-1, -1, -1, -1, 1, 1, 1, 1]);
  });

  it("a last, partial group still uses its nominal centre: groups of 3 over 8 columns (derived by hand)", () => {
    // Centres 2·G·3 + 3 − 8 = −5, 1, 7 half-pixels → R(−1.25) = −1, R(0.25) = 0, R(1.75) = 2.
    expect(Array.from(columnShifts(128, 8, 8, 3, q88))).toEqual([-1, -1, -1, 0, 0, 0, 2, 2]);
  });

  it("columnGroup 1 is the per-column table s(kβ, u_c)", () => {
    fc.assert(
      fc.property(fc.integer({ min: -32768, max: 32767 }), fc.integer({ min: 1, max: 40 }), fc.nat(), (k, W, p) => {
        const p2x = p % (2 * W + 1);
        const v = Array.from(columnShifts(k, W, p2x, 1, q88));
        return v.every((s, c) => s === refTables(0, k, W, 1, { x: p2x / 2, y: 0 }, 8, "nearest-away").v[c]);
      }),
      { numRuns: 200 },
    );
  });
});

describe("both tables agree with the BigInt reading of spec §4 for any coefficients, canvas, pivot, group and rounding", () => {
  it("h and v", () => {
    fc.assert(
      fc.property(
        fc.integer({ min: -(2 ** 31), max: 2 ** 31 - 1 }),
        fc.integer({ min: -(2 ** 31), max: 2 ** 31 - 1 }),
        fc.integer({ min: 1, max: 48 }),
        fc.integer({ min: 1, max: 48 }),
        fc.nat(),
        fc.nat(),
        fc.nat(),
        fc.integer({ min: 16, max: 31 }),
        fc.constantFrom<Rounding>(...ROUNDINGS),
        (alpha, beta, W, H, px, py, g, F, rounding) => {
          const pivot = { x: (px % (2 * W + 1)) / 2, y: (py % (2 * H + 1)) / 2 };
          const group = (g % W) + 1;
          const rule = { fraction: F, rounding };
          const ref = refTables(alpha, beta, W, H, pivot, F, rounding, group);
          expect(Array.from(rowShifts(alpha, H, pivot.y * 2, rule))).toEqual(ref.h);
          expect(Array.from(columnShifts(beta, W, pivot.x * 2, group, rule))).toEqual(ref.v);
        },
      ),
      { numRuns: 300 },
    );
  });
});

describe("the table code rounds exact halves as the BigInt reading of spec §4 does, for every rounding rule", () => {
  // With few fraction bits and small coefficients, k·t/2^(F+1) lands on m + 1/2 for many rows and columns: exactly where
  // the four rules differ. A pivot on a pixel edge makes every t odd (t = 2r + 1 − P2y), on a pixel centre every t even.
  const isHalf = (k: number, t: number, F: number) => Math.abs(k * t) % 2 ** (F + 1) === 2 ** F;

  it.each(ROUNDINGS)("%s: h and v equal the reference entry for entry, halves included", (rounding) => {
    let halves = 0;
    fc.assert(
      fc.property(
        fc.integer({ min: -40, max: 40 }),
        fc.integer({ min: -40, max: 40 }),
        fc.integer({ min: 1, max: 24 }),
        fc.integer({ min: 1, max: 24 }),
        fc.nat(),
        fc.nat(),
        fc.nat(),
        fc.integer({ min: 0, max: 3 }),
        (alpha, beta, W, H, px, py, g, F) => {
          const pivot = { x: (px % (2 * W + 1)) / 2, y: (py % (2 * H + 1)) / 2 };
          const group = (g % W) + 1;
          const rule = { fraction: F, rounding };
          const ref = refTables(alpha, beta, W, H, pivot, F, rounding, group);
          expect(Array.from(rowShifts(alpha, H, pivot.y * 2, rule))).toEqual(ref.h);
          expect(Array.from(columnShifts(beta, W, pivot.x * 2, group, rule))).toEqual(ref.v);
          for (let r = 0; r < H; r++) if (isHalf(alpha, 2 * r + 1 - 2 * pivot.y, F)) halves++;
        },
      ),
      { numRuns: 300 },
    );
    // The property is only worth something if it met many exact halves (this is not a timing, it counts the cases).
    expect(halves).toBeGreaterThan(300);
  });

  it("at x = ±1/2 and ±3/2 the four rules give their textbook answers in the table code too (derived by hand)", () => {
    // k = 1, F = 0, pivot on the edge y = 2 of 4 rows: t = −3, −1, 1, 3, so x = t/2 = −1.5, −0.5, 0.5, 1.5.
    const table = (rounding: Rounding) => Array.from(rowShifts(1, 4, 4, { fraction: 0, rounding }));
    expect(table("nearest-away")).toEqual([-2, -1, 1, 2]);
    expect(table("nearest-up")).toEqual([-1, 0, 1, 2]);
    expect(table("floor")).toEqual([-2, -1, 0, 1]);
    expect(table("trunc")).toEqual([-1, 0, 0, 1]);
  });
});
