// Effects and export options the tool tests run through the real assemblers and compilers. The expected element type
// of each is reasoned out beside it, not read from the exporter.
import type { ExportOptionsInput } from "../../src/export/options.ts";
import type { ExpectedOptions } from "./expected.ts";

export interface ExportCase {
  readonly id: string;
  readonly effect: unknown;
  readonly options: ExportOptionsInput & { readonly label: string };
  readonly element: ExpectedOptions["element"];
}

const compass = {
  canvas: { width: 32, height: 32 },
  pivot: { x: 16, y: 16 },
  angles: { sweep: { from: 0, to: 360, frames: 64, easing: "linear", includeEnd: false } },
  fixedPoint: { bits: 16, fraction: 8 },
  edges: "wrap",
};

const wide = {
  canvas: { width: 320, height: 200 },
  pivot: { x: 160, y: 100 },
  angles: { list: [0, 30, 100, 150, -170] },
  halfTurn: "shear",
};

export const CASES: readonly ExportCase[] = [
  // The demo emblem: with the flip, |θr| <= 90 so |tan(θr/2)| <= 1 and |sin θr| <= 1: no shift beyond 16 px on a 32 px canvas.
  { id: "compass, defaults", effect: compass, options: { label: "compass", name: "Compass rose" }, element: "int8" },
  // Scroll sign, half tables (nearest-away about a centred pivot is symmetric, spec §4) and dedupe (no frame repeats).
  {
    id: "compass, scroll half dedupe",
    effect: compass,
    options: { label: "rose", sign: "scroll", half: true, dedupe: true },
    element: "int8",
  },
  // A ±12° tilt that repeats frames, for a 10-bit scroll register: values wrap into 0..1023, which needs 16 bits.
  {
    id: "storm, 10-bit scroll register split half dedupe",
    effect: {
      canvas: { width: 256, height: 224 },
      pivot: { x: 128, y: 112 },
      angles: { list: [0, 6, 12, 6, 0, -6, -12, -6, 0] },
      columnGroup: 16,
    },
    options: { label: "storm", sign: "scroll", registerBits: 10, split: true, half: true, dedupe: true },
    element: "uint16",
  },
  // No flip near ±180°: tan(85°) ≈ 11.4 times 100 rows is about 1143 px, beyond int8, within int16.
  { id: "wide, int16 split", effect: wide, options: { label: "wide_fx", split: true }, element: "int16" },
  { id: "wide, forced int32 scroll", effect: wide, options: { label: "Wide32", element: "int32", sign: "scroll" }, element: "int32" },
  // tan(89.95°) ≈ 1146 times 1024 rows is about 1.17 million px: only int32 holds it; 32-bit coefficients.
  {
    id: "tall, int32 floor dedupe",
    effect: {
      canvas: { width: 8, height: 2048 },
      pivot: { x: 4, y: 1024 },
      angles: { list: [179.5, -179.9, 10] },
      halfTurn: "shear",
      fixedPoint: { bits: 32, fraction: 16 },
      rounding: "floor",
    },
    options: { label: "tall_tower_spin_effect1", dedupe: true }, // the longest label allowed: 23 characters
    element: "int32",
  },
  // Q1.7 coefficients (sin 90° saturates to 127, spec §3), trunc rounding (symmetric like nearest-away), half tables.
  {
    id: "q1.7, trunc half",
    effect: {
      canvas: { width: 16, height: 16 },
      pivot: { x: 8, y: 8 },
      angles: { list: [0, 45, 90, -90, 30] },
      halfTurn: "shear",
      fixedPoint: { bits: 8, fraction: 7 },
      rounding: "trunc",
    },
    options: { label: "q17", half: true },
    element: "int8",
  },
  // An odd canvas with a pivot on a pixel centre, column groups of 4 that do not divide 15, nearest-up rounding and
  // a 9-bit register stored as uint16 (9 bits need a 16-bit type).
  {
    id: "odd, 9-bit register uint16",
    effect: {
      canvas: { width: 15, height: 9 },
      pivot: { x: 7.5, y: 4.5 },
      angles: { sweep: { from: -40, to: 40, frames: 5, easing: "ease-in-out", includeEnd: true } },
      columnGroup: 4,
      rounding: "nearest-up",
    },
    options: { label: "odd", registerBits: 9, element: "uint16" },
    element: "uint16",
  },
  // A 16-bit register: negative shifts wrap to 65535 and below, beyond a 16-bit int's range, so the C needs "u" suffixes
  // (uint16, values up to 2^16 − 1); Q1.15 coefficients make the run-time routine's rounding constant 2^15 = 32768.
  {
    id: "wrap16, Q1.15, 16-bit register",
    effect: {
      canvas: { width: 40, height: 30 },
      pivot: { x: 20, y: 15 },
      angles: { list: [0, 20, -20, 75] },
      fixedPoint: { bits: 16, fraction: 15 },
    },
    options: { label: "wrap16", registerBits: 16 },
    element: "uint16",
  },
  // A 32-bit register: −1 wraps to 4294967295, which needs "UL".
  {
    id: "wrap32, 32-bit register",
    effect: { canvas: { width: 12, height: 10 }, pivot: { x: 6, y: 5 }, angles: { list: [0, 45, -45] } },
    options: { label: "wrap32", registerBits: 32 },
    element: "uint32",
  },
];

/** The expected-model options of a case (defaults as the issue states them). */
export function expectedOptions(c: ExportCase): ExpectedOptions {
  return {
    label: c.options.label,
    sign: c.options.sign ?? "shift",
    registerBits: c.options.registerBits ?? null,
    element: c.element,
    split: c.options.split ?? false,
    half: c.options.half ?? false,
    dedupe: c.options.dedupe ?? false,
  };
}
