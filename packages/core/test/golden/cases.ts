// The effects and jobs whose outputs the golden test pins: every effect the tool and CLI tests use, and more that
// reach the fast paths (centred pivots with symmetric rounding, odd sizes, column groups that do and do not divide the
// width, clip and wrap, flip and shear, 8/16/32-bit coefficients, all four roundings, a mask, tracks long enough to
// be spread over worker threads). The pictures are invented test data, drawn by a fixed pseudo-random sequence.
import { CASES } from "../export/cases.ts";

/** One effect document run through `skewsmith tables` (and, with a mask, through compileTables). */
export interface TablesJob {
  readonly id: string;
  readonly effect: object;
  /** Measure over a mask drawn by this rule (API level: the CLI has no mask option). */
  readonly mask?: "ellipse" | "noise" | "symmetric-noise";
}

/** One `skewsmith render` call (small canvases: through the PNG files) or one renderImage call (large ones: the pixels alone). */
export interface RenderJob {
  readonly id: string;
  readonly effect: object;
  readonly image: "indexed" | "rgba";
  readonly frames: readonly number[];
  readonly passes: readonly (1 | 2 | 3)[];
  /** "cli": through `skewsmith render` and its PNG files; "api": renderImage on the decoded pixels, hashed. */
  readonly via: "cli" | "api";
  /** API jobs only: replace the frame's tables by pseudo-random shifts (any tables a caller may pass, not only an effect's). */
  readonly shifts?: "noise";
}

/** One `skewsmith export --out DIR --zip FILE` call with these flags. */
export interface ExportJob {
  readonly id: string;
  /** The effect file's base name: it gives the default label. */
  readonly file: string;
  readonly effect: object;
  readonly args: readonly string[];
}

const caseEffect = (prefix: string) => CASES.find((c) => c.id.startsWith(prefix))!.effect as object;

const sweep = (from: number, to: number, frames: number, extra: object = {}) => ({ sweep: { from, to, frames, ...extra } });

const centred = (width: number, height: number, rest: object) => ({
  canvas: { width, height },
  pivot: { x: width / 2, y: height / 2 },
  ...rest,
});

/** Angles at the edges of the half-turn rule and of the normalisation (spec §2). */
const BOUNDARY = [0, 45, 90, -90, 90.0001, -90.0001, 90.5, -90.5, 179.9, -179.9, 180, -180, 360, 720.5, -0.125, 12.375];

export const TABLES_JOBS: readonly TablesJob[] = [
  // The tool tests' effects (test/export/cases.ts).
  ...[...new Set(CASES.map((c) => c.effect))].map((effect) => ({
    id: `case ${CASES.find((c) => c.effect === effect)!.id}`,
    effect: effect as object,
  })),
  // The CLI tests' effects (test/cli/*.test.ts).
  { id: "cli spec 30° 4×16", effect: { canvas: { width: 4, height: 16 }, pivot: { x: 2, y: 7.5 }, angles: { list: [30] } } },
  {
    id: "cli q1.7 90°",
    effect: { canvas: { width: 2, height: 2 }, pivot: { x: 1, y: 1 }, angles: { list: [90] }, fixedPoint: { bits: 8, fraction: 7 } },
  },
  ...["nearest-away", "nearest-up", "floor", "trunc"].map((rounding) => ({
    id: `cli halves ${rounding}`,
    effect: { canvas: { width: 1, height: 4 }, pivot: { x: 0.5, y: 2 }, angles: { list: [90] }, rounding },
  })),
  {
    id: "cli flips and groups 8×2",
    effect: { canvas: { width: 8, height: 2 }, pivot: { x: 4, y: 1 }, angles: { list: [30, -540, 200, 135, 90] }, columnGroup: 4 },
  },
  {
    id: "cli ease-in-out 2×2",
    effect: {
      canvas: { width: 2, height: 2 },
      pivot: { x: 1, y: 1 },
      angles: sweep(0, 180, 5, { easing: "ease-in-out", includeEnd: true }),
    },
  },
  {
    id: "cli render 12×10 clip",
    effect: { canvas: { width: 12, height: 10 }, pivot: { x: 6, y: 5 }, angles: sweep(0, 360, 4), edges: "clip" },
  },
  // Centred pivots, every rounding, wrap and clip, flip and shear: symmetric tables where the rounding is symmetric.
  ...["nearest-away", "nearest-up", "floor", "trunc"].flatMap((rounding) =>
    ["wrap", "clip"].map((edges) => ({
      id: `320×240 ${rounding} ${edges}`,
      effect: centred(320, 240, { angles: sweep(0, 360, 48), rounding, edges }),
    })),
  ),
  { id: "320×240 shear clip", effect: centred(320, 240, { angles: sweep(-170, 170, 40), halfTurn: "shear", edges: "clip" }) },
  // Odd sizes about the centre pixel; groups of 3 divide 321, groups of 16 do not.
  {
    id: "321×241 group 3",
    effect: centred(321, 241, { angles: sweep(-200, 200, 33, { easing: "ease-in-out", includeEnd: true }), columnGroup: 3 }),
  },
  { id: "321×241 group 16 clip", effect: centred(321, 241, { angles: sweep(-200, 200, 33), columnGroup: 16, edges: "clip" }) },
  { id: "320×241 trunc", effect: centred(320, 241, { angles: sweep(5, 365, 24), rounding: "trunc" }) },
  { id: "321×240 wrap", effect: centred(321, 240, { angles: sweep(5, 365, 24) }) },
  // Boundary angles, both half-turn rules, both edge rules.
  ...["flip", "shear"].flatMap((halfTurn) =>
    ["wrap", "clip"].map((edges) => ({
      id: `96×64 boundary ${halfTurn} ${edges}`,
      effect: centred(96, 64, { angles: { list: BOUNDARY }, halfTurn, edges }),
    })),
  ),
  // 8-, 16- and 32-bit coefficients, saturation included.
  { id: "64×64 Q1.7 clip", effect: centred(64, 64, { angles: sweep(0, 360, 40), fixedPoint: { bits: 8, fraction: 7 }, edges: "clip" }) },
  { id: "64×48 Q4.4", effect: centred(64, 48, { angles: sweep(-90, 90, 37, { includeEnd: true }), fixedPoint: { bits: 8, fraction: 4 } }) },
  {
    id: "200×120 Q8.24 floor",
    effect: centred(200, 120, { angles: sweep(0, 360, 30), fixedPoint: { bits: 32, fraction: 24 }, rounding: "floor" }),
  },
  { id: "100×100 Q16.16", effect: centred(100, 100, { angles: sweep(0, 720, 45), fixedPoint: { bits: 32, fraction: 16 } }) },
  {
    id: "40×30 Q2.14 shear",
    effect: centred(40, 30, { angles: { list: BOUNDARY }, fixedPoint: { bits: 16, fraction: 14 }, halfTurn: "shear" }),
  },
  // Pivots off the centre: on a pixel centre, on a corner, on the canvas edge.
  {
    id: "200×150 off-centre clip",
    effect: { canvas: { width: 200, height: 150 }, pivot: { x: 37.5, y: 120 }, angles: sweep(0, 360, 36), edges: "clip" },
  },
  {
    id: "120×90 corner pivot",
    effect: { canvas: { width: 120, height: 90 }, pivot: { x: 0, y: 0 }, angles: sweep(-45, 45, 19, { includeEnd: true }) },
  },
  {
    id: "120×90 edge pivot group 5",
    effect: { canvas: { width: 120, height: 90 }, pivot: { x: 120, y: 44.5 }, angles: sweep(0, 360, 20), columnGroup: 5 },
  },
  // Many frames on a small canvas (every exact quarter turn included), and a track long enough for worker threads.
  { id: "16×16 1024 frames", effect: centred(16, 16, { angles: sweep(0, 360, 1024) }) },
  { id: "16×15 721 frames clip", effect: centred(16, 15, { angles: sweep(-360, 360, 721, { includeEnd: true }), edges: "clip" }) },
  { id: "640×480 192 frames", effect: centred(640, 480, { angles: sweep(0, 360, 192) }) },
  {
    id: "640×480 96 frames clip nearest-up",
    effect: centred(640, 480, { angles: sweep(0, 360, 96), edges: "clip", rounding: "nearest-up" }),
  },
  // Masks (compileTables' option): a sprite-like ellipse, and noise with and without point symmetry about the centre.
  { id: "mask ellipse 96×64", effect: centred(96, 64, { angles: sweep(0, 360, 32) }), mask: "ellipse" },
  { id: "mask noise 96×64 clip", effect: centred(96, 64, { angles: sweep(0, 360, 32), edges: "clip" }), mask: "noise" },
  { id: "mask symmetric 97×63", effect: centred(97, 63, { angles: sweep(0, 360, 32) }), mask: "symmetric-noise" },
];

export const RENDER_JOBS: readonly RenderJob[] = [
  ...(["indexed", "rgba"] as const).map((image) => ({
    id: `cli render 12×10 clip ${image}`,
    effect: { canvas: { width: 12, height: 10 }, pivot: { x: 6, y: 5 }, angles: sweep(0, 360, 4), edges: "clip" },
    image,
    frames: [0, 1, 2, 3],
    passes: [1, 2, 3] as const,
    via: "cli" as const,
  })),
  { id: "compass rgba", effect: caseEffect("compass"), image: "rgba", frames: [0, 5, 13, 31, 40, 63], passes: [3], via: "cli" },
  { id: "wide indexed", effect: caseEffect("wide"), image: "indexed", frames: [0, 1, 2, 3, 4], passes: [1, 2, 3], via: "cli" },
  { id: "odd rgba", effect: caseEffect("odd"), image: "rgba", frames: [0, 1, 2, 3, 4], passes: [3], via: "cli" },
  { id: "q1.7 indexed", effect: caseEffect("q1.7"), image: "indexed", frames: [0, 1, 2, 3, 4], passes: [3], via: "cli" },
  { id: "tall indexed", effect: caseEffect("tall"), image: "indexed", frames: [0, 1, 2], passes: [3], via: "cli" },
  { id: "storm rgba", effect: caseEffect("storm"), image: "rgba", frames: [1, 2, 6], passes: [2, 3], via: "cli" },
  {
    id: "boundary clip rgba",
    effect: centred(96, 64, { angles: { list: BOUNDARY }, edges: "clip" }),
    image: "rgba",
    frames: [2, 4, 5, 6, 8, 10, 13],
    passes: [3],
    via: "cli",
  },
  // Larger canvases through renderImage: strips of the column pass, both edge rules, odd sizes, both pixel kinds.
  ...(["indexed", "rgba"] as const).flatMap((image) =>
    (["wrap", "clip"] as const).map((edges) => ({
      id: `1023×767 ${edges} ${image}`,
      effect: centred(1023, 767, { angles: { list: [7, 30, 80, -45, 135, -100, 179.9, 0.5] }, edges }),
      image,
      frames: [0, 1, 2, 3, 4, 5, 6, 7],
      passes: [1, 2, 3] as const,
      via: "api" as const,
    })),
  ),
  {
    id: "1024×768 off-centre shear rgba",
    effect: { canvas: { width: 1024, height: 768 }, pivot: { x: 100, y: 700.5 }, angles: { list: [20, 100, -150] }, halfTurn: "shear" },
    image: "rgba",
    frames: [0, 1, 2],
    passes: [3],
    via: "api",
  },
  // Tables no effect makes (shifts that go both ways, beyond the canvas), which the Renderer still draws by spec §5.
  ...(["indexed", "rgba"] as const).flatMap((image) =>
    (["wrap", "clip"] as const).map((edges) => ({
      id: `noise shifts 517×300 ${edges} ${image}`,
      effect: centred(517, 300, { angles: { list: [0, 90, 180, -150] }, edges }),
      image,
      frames: [0, 1, 2, 3],
      passes: [1, 2, 3] as const,
      via: "api" as const,
      shifts: "noise" as const,
    })),
  ),
  ...(["wrap", "clip"] as const).map((edges) => ({
    id: `3840×2160 ${edges} rgba`,
    effect: centred(3840, 2160, { angles: { list: [7, 30, 80] }, edges }),
    image: "rgba" as const,
    frames: [0, 1, 2],
    passes: [3] as const,
    via: "api" as const,
  })),
];

/** The CLI flags of an export case's options. */
function flags(options: (typeof CASES)[number]["options"]): string[] {
  const args = ["--label", options.label];
  if (options.sign) args.push("--sign", options.sign);
  if (options.registerBits !== undefined && options.registerBits !== null) args.push("--register-bits", String(options.registerBits));
  if (options.element) args.push("--element", options.element);
  if (options.outputs) args.push("--outputs", options.outputs.join(","));
  if (options.split) args.push("--split");
  if (options.half) args.push("--half");
  if (options.dedupe) args.push("--dedupe");
  return args;
}

export const EXPORT_JOBS: readonly ExportJob[] = [
  ...CASES.map((c) => ({ id: `case ${c.id}`, file: `${c.options.label}.json`, effect: c.effect as object, args: flags(c.options) })),
  // The CLI tests' calls (test/export/cli.test.ts).
  { id: "cli compass defaults", file: "compass.json", effect: caseEffect("compass"), args: [] },
  { id: "cli wide c only", file: "wide.effect.json", effect: caseEffect("wide"), args: ["--outputs", "c"] },
  {
    id: "cli storm zip",
    file: "compass.json",
    effect: caseEffect("compass"),
    args: ["--label", "storm", "--outputs", "6502,z80,bin", "--sign", "scroll", "--register-bits", "9", "--dedupe"],
  },
  {
    id: "cli wide split scroll int32",
    file: "wide.effect.json",
    effect: caseEffect("wide"),
    args: ["--label", "wide", "--split", "--sign", "scroll", "--element", "int32"],
  },
  { id: "cli wide json", file: "wide.effect.json", effect: caseEffect("wide"), args: ["--outputs", "json"] },
  { id: "cli compass dedupe split", file: "compass.json", effect: caseEffect("compass"), args: ["--dedupe", "--split"] },
  // A longer track with the JSON document (diagnostics in the bundle) and half tables.
  { id: "320×240 half json", file: "spin.json", effect: centred(320, 240, { angles: sweep(0, 360, 64) }), args: ["--half", "--dedupe"] },
  {
    id: "321×241 clip json",
    file: "odd_spin.json",
    effect: centred(321, 241, { angles: sweep(0, 360, 24), edges: "clip", columnGroup: 3 }),
    args: [],
  },
];
