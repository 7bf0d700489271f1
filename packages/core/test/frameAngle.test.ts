import { describe, expect, it } from "vitest";
import { frameAngle, normalizeDegrees } from "../src/index.ts";
import { expectClose } from "./helpers/expectClose.ts";

describe("normalizeDegrees: θ reduced into (−180°, 180°] (spec §2)", () => {
  it.each([
    [0, 0],
    [90, 90],
    [180, 180],
    [-180, 180],
    [540, 180],
    [-540, 180],
    [360, 0],
    [-360, 0],
    [720, 0],
    [190, -170],
    [-190, 170],
    [270, -90],
    [-270, 90],
    [359, -1],
    [-179, -179],
    [1080 + 45, 45],
  ])("%f° → %f°", (input, expected) => {
    const n = normalizeDegrees(input);
    expect(n).toBe(expected);
    expect(Object.is(n, -0)).toBe(false);
  });

  it("keeps fractions: 720.5° → 0.5°, −0.25° stays −0.25°", () => {
    expectClose(normalizeDegrees(720.5), 0.5);
    expect(normalizeDegrees(-0.25)).toBe(-0.25);
  });

  it("rejects a non-finite angle, naming the value", () => {
    expect(() => normalizeDegrees(Number.POSITIVE_INFINITY)).toThrow(/Infinity/);
    expect(() => normalizeDegrees(Number.NaN)).toThrow(/NaN/);
  });
});

describe("frameAngle: half turn by flip or by shear (spec §2)", () => {
  it.each([
    // [θ, θn, θr, flip] with halfTurn "flip": |θn| > 90° flips and leaves θn − 180° (θn > 0) or θn + 180° (θn < 0).
    [0, 0, 0, false],
    [45, 45, 45, false],
    [90, 90, 90, false],
    [-90, -90, -90, false],
    [91, 91, -89, true],
    [-91, -91, 89, true],
    [135, 135, -45, true],
    [-135, -135, 45, true],
    [180, 180, 0, true],
    [-180, 180, 0, true],
    [200, -160, 20, true],
    [450, 90, 90, false],
  ])("flip: %f° → θn %f°, θr %f°, flip %s", (degrees, n, r, flip) => {
    expect(frameAngle(degrees, "flip")).toEqual({ degrees: n, residualDegrees: r, flip });
  });

  it.each([
    // Just past the quarter turn the flip starts (|θn| > 90°, spec §2): the residual is then just short of ∓90°.
    [90.0001, -89.9999, true],
    [-90.0001, 89.9999, true],
    [90.5, -89.5, true],
    [-90.5, 89.5, true],
    [179.9, -0.1, true],
    [-179.9, 0.1, true],
    [450.5, -89.5, true],
    [-629.5, -89.5, true], // −629.5° = 90.5° − 720°
  ])("flip at the boundary: %f° → θr %f°, flip %s", (degrees, residual, flip) => {
    const a = frameAngle(degrees, "flip");
    expect(a.flip).toBe(flip);
    expectClose(a.residualDegrees, residual, 1e-9, `residual of ${degrees}°`);
    expectClose(a.degrees, normalizeDegrees(degrees), 0, `θn of ${degrees}°`);
  });

  it.each([
    [135, 135],
    [-135, -135],
    [180, 180],
    [-180, 180],
    [200, -160],
  ])("shear never flips: %f° → θr = θn = %f°", (degrees, n) => {
    expect(frameAngle(degrees, "shear")).toEqual({ degrees: n, residualDegrees: n, flip: false });
  });
});
