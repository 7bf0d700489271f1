import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { BOUNDARY_ANGLES, firstFrame, smallEffect, turningAngle } from "./helpers/arbitraries.ts";

// The property tests are only as strong as what they draw: an angle generator that mostly yields 0° tests no turn at all.
describe("the property tests' generators", () => {
  it("draw effects whose frame really turns: most move some pixel or flip, and every quadrant and both flips occur", () => {
    const effects = fc.sample(smallEffect(), { numRuns: 1000, seed: 20240611 });
    const frames = effects.map(firstFrame).filter((f) => f !== undefined);
    const moving = frames.filter((f) => f.flip || f.maxAbsShift > 0);
    expect(frames.length).toBeGreaterThan(900);
    expect(moving.length / frames.length).toBeGreaterThan(0.75);
    const quadrant = (d: number) => Math.min(3, Math.floor((d + 180) / 90));
    expect(new Set(frames.map((f) => quadrant(f.degrees))).size).toBe(4);
    expect(frames.some((f) => f.flip)).toBe(true);
    expect(frames.some((f) => !f.flip && Math.abs(f.degrees) > 90)).toBe(true); // halfTurn "shear" past the quarter turn
  });

  it("draw the boundary angles of spec §2, and multiples of 1/8° across ±720°", () => {
    const angles = fc.sample(turningAngle, { numRuns: 2000, seed: 7 });
    for (const b of BOUNDARY_ANGLES) expect(angles, `${b}°`).toContain(b);
    expect(angles.every((a) => Number.isInteger(a * 8) || (BOUNDARY_ANGLES as readonly number[]).includes(a))).toBe(true);
    expect(Math.min(...angles)).toBeLessThan(-600);
    expect(Math.max(...angles)).toBeGreaterThan(600);
    expect(angles.filter((a) => a % 360 === 0).length).toBeLessThan(100); // fc.integer leans a little towards 0 and the ends
  });
});
