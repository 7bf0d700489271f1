import { afterAll, describe, expect, it } from "vitest";
import { workdir } from "../helpers/cli.ts";
import { expectClose } from "../helpers/expectClose.ts";

const w = workdir();
afterAll(() => w.remove());

/** Runs `skewsmith tables` on an effect document and returns the parsed tables document, checking the streams. */
async function tables(effect: object, name = "effect.json") {
  const r = await w.run("tables", w.write(name, effect));
  expect(r.stderr).toBe("");
  expect(r.code).toBe(0);
  // stdout is exactly one JSON object and a newline: nothing else.
  expect(r.stdout.endsWith("}\n")).toBe(true);
  expect(r.stdout.trimEnd().includes("\n")).toBe(false);
  return JSON.parse(r.stdout);
}

describe("skewsmith tables agrees with the spec on worked cases (derived by hand, not from the code)", () => {
  it("spec §9: 30° on a 16-row grid about a pixel centre, and the column rule of thumb", async () => {
    const doc = await tables({ canvas: { width: 4, height: 16 }, pivot: { x: 2, y: 7.5 }, angles: { list: [30] } });
    expect(doc.format).toBe("skewsmith.tables/1");
    expect(doc.elementType).toBe("int8");
    const f = doc.frames[0];
    // kα = nearest(−tan 15°·256) = nearest(−68.59) = −69; kβ = nearest(sin 30°·256) = 128.
    expect([f.degrees, f.residualDegrees, f.flip, f.alpha, f.beta, f.saturated]).toEqual([30, 30, false, -69, 128, false]);
    // Rows −7 … 8 from the pivot: 0 and ±1 stay, ±2 … ±5 move one pixel, ±6 … ±8 two; lower rows move left (spec §9).
    expect(f.h).toEqual([2, 2, 1, 1, 1, 1, 0, 0, 0, -1, -1, -1, -1, -2, -2, -2]);
    // Columns at u = −3, −1, 1, 3 half-pixels: R(128·u/512) = R(−0.75, −0.25, 0.25, 0.75) = −1, 0, 0, 1.
    expect(f.v).toEqual([-1, 0, 0, 1]);
    expect(f.maxAbsShift).toBe(2);
  });

  it("spec §3: sin 90° does not fit Q1.7, kβ = 127 and the frame is saturated", async () => {
    const doc = await tables({
      canvas: { width: 2, height: 2 },
      pivot: { x: 1, y: 1 },
      angles: { list: [90] },
      fixedPoint: { bits: 8, fraction: 7 },
    });
    const f = doc.frames[0];
    expect([f.alpha, f.beta, f.saturated]).toEqual([-128, 127, true]);
    // h = R(−128·(∓1)/256) = R(±1/2) = ±1; v = R(127·(∓1)/256) = R(∓0.496) = 0.
    expect([f.h, f.v]).toEqual([
      [1, -1],
      [0, 0],
    ]);
  });

  it("the four roundings at exact halves: rows at ±1/2 and ±3/2 pixels shifted by 90° (spec §4)", async () => {
    // One column, 4 rows about y = 2: v_r = −3, −1, 1, 3; kα = −256 → x = −256·v/512 = 1.5, 0.5, −0.5, −1.5.
    const expected = {
      "nearest-away": [2, 1, -1, -2],
      "nearest-up": [2, 1, 0, -1],
      floor: [1, 0, -1, -2],
      trunc: [1, 0, 0, -1],
    };
    const docs = await Promise.all(
      Object.keys(expected).map((rounding) =>
        tables({ canvas: { width: 1, height: 4 }, pivot: { x: 0.5, y: 2 }, angles: { list: [90] }, rounding }, `${rounding}.json`),
      ),
    );
    docs.forEach((doc, i) => {
      const rounding = Object.keys(expected)[i] as keyof typeof expected;
      expect(doc.effect.rounding).toBe(rounding);
      expect(doc.frames[0].h, rounding).toEqual(expected[rounding]);
    });
  });

  it("normalisation, half-turn flips, column groups and the defaults filled in", async () => {
    const doc = await tables({
      canvas: { width: 8, height: 2 },
      pivot: { x: 4, y: 1 },
      angles: { list: [30, -540, 200, 135, 90] },
      columnGroup: 4,
    });
    expect(doc.effect).toEqual({
      format: "skewsmith.effect/1",
      canvas: { width: 8, height: 2 },
      pivot: { x: 4, y: 1 },
      angles: { list: [30, -540, 200, 135, 90] },
      fixedPoint: { bits: 16, fraction: 8 },
      rounding: "nearest-away",
      halfTurn: "flip",
      edges: "wrap",
      columnGroup: 4,
    });
    expect(
      doc.frames.map((f: { degrees: number; residualDegrees: number; flip: boolean }) => [f.degrees, f.residualDegrees, f.flip]),
    ).toEqual([
      [30, 30, false],
      [180, 0, true],
      [-160, 20, true],
      [135, -45, true],
      [90, 90, false],
    ]);
    // Groups of 4 centred 2 pixels either side of the pivot: R(128·(∓4)/512) = ∓1 at 30° (spec §4).
    expect(doc.frames[0].v).toEqual([-1, -1, -1, -1, 1, 1, 1, 1]);
    // At 90° kβ = 256: R(256·(∓4)/512) = ∓2.
    expect(doc.frames[4].v).toEqual([-2, -2, -2, -2, 2, 2, 2, 2]);
    // A flipped half turn needs no shear at all; the point reflection is exact.
    expect(doc.frames[1]).toMatchObject({ alpha: 0, beta: 0, h: [0, 0], v: [0, 0, 0, 0, 0, 0, 0, 0], wrapped: 0 });
    expectClose(doc.frames[1].maxErrorPx, 0, 1e-12, "error of the half turn"); // sin 180° is 1.2e−16 in floating point
  });

  it("an ease-in-out sweep with its end: 0 → 180 in 5 frames is 0, 90(1 − √2/2), 90, 90(1 + √2/2), 180 (spec §2)", async () => {
    const doc = await tables({
      canvas: { width: 2, height: 2 },
      pivot: { x: 1, y: 1 },
      angles: { sweep: { from: 0, to: 180, frames: 5, easing: "ease-in-out", includeEnd: true } },
    });
    const h = Math.SQRT2 / 2;
    [0, 90 * (1 - h), 90, 90 * (1 + h), 180].forEach((d, i) => expectClose(doc.frames[i].degrees, d, 1e-9, `frame ${i}`));
    expect(doc.frames[4].flip).toBe(true);
  });
});

describe("skewsmith tables refuses bad input without printing tables", () => {
  it("a half-valid document: every bad field on stderr, nothing on stdout, exit 2", async () => {
    const r = await w.run(
      "tables",
      w.write("bad.json", { canvas: { width: 8, height: 0 }, pivot: { x: 3.25, y: 1 }, angles: { list: [0] }, edges: "bounce" }),
    );
    expect(r.code).toBe(2);
    expect(r.stdout).toBe("");
    expect(r.stderr).toContain("bad.json");
    expect(r.stderr).toContain("canvas.height: 0 is not allowed; allowed a whole number from 1 to 4096");
    expect(r.stderr).toContain("pivot.x: 3.25 is not allowed");
    expect(r.stderr).toContain('edges: "bounce" is not allowed; allowed one of "wrap", "clip"');
  });

  it("bad JSON, a missing file, a missing argument and an unknown option: a clear message and exit 2", async () => {
    const results = await Promise.all([
      w.run("tables", w.write("broken.json", '{"canvas": {"width": 8,')),
      w.run("tables", "absent.json"),
      w.run("tables"),
      w.run("tables", "--colour", "broken.json"),
    ]);
    for (const r of results) {
      expect(r.code).toBe(2);
      expect(r.stdout).toBe("");
    }
    expect(results[0].stderr).toMatch(/broken\.json: not valid JSON/);
    expect(results[1].stderr).toMatch(/absent\.json/);
    expect(results[2].stderr).toMatch(/missing EFFECT\.json/);
    expect(results[3].stderr).toMatch(/--colour/);
  });

  it("shifts no element type holds are an error, not wrapped numbers (spec §4)", async () => {
    const r = await w.run(
      "tables",
      w.write("huge.json", {
        canvas: { width: 2, height: 2 },
        pivot: { x: 0, y: 0 },
        angles: { list: [180] },
        fixedPoint: { bits: 32, fraction: 0 },
        halfTurn: "shear",
      }),
    );
    expect(r.code).toBe(2);
    expect(r.stdout).toBe("");
    expect(r.stderr).toMatch(/does not fit int32/);
  });
});
