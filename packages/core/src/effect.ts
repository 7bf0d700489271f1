// A namespace import: the bundler keeps only what is used (the named `z` binding kept every locale, 570 KB more to compile).
import * as z from "zod";
import { EffectError, type EffectIssue } from "./effectError.ts";
import {
  EASINGS,
  EDGES,
  HALF_TURNS,
  LIMITS,
  ROUNDINGS,
  type Bits,
  type Easing,
  type Edges,
  type HalfTurn,
  type Rounding,
} from "./limits.ts";

export { EffectError, type EffectIssue } from "./effectError.ts";

/** Format tag of an effect document (spec §7). */
export const EFFECT_FORMAT = "skewsmith.effect/1";

/** A sweep angle track: `frames` angles from `from` to `to` degrees (spec §2). */
export interface Sweep {
  readonly from: number;
  readonly to: number;
  readonly frames: number;
  readonly easing: Easing;
  readonly includeEnd: boolean;
}

/** An angle track in degrees: an explicit list or a sweep (spec §2). */
export type AngleTrack = { readonly list: readonly number[] } | { readonly sweep: Sweep };

/** A fully validated effect document with every default filled in (spec §7). */
export interface Effect {
  readonly format: typeof EFFECT_FORMAT;
  /** Canvas size in pixels. */
  readonly canvas: { readonly width: number; readonly height: number };
  /** Pivot in pixel-edge coordinates, a multiple of 0.5 pixels. */
  readonly pivot: { readonly x: number; readonly y: number };
  readonly angles: AngleTrack;
  /** Signed two's complement coefficients: `bits` in all, `fraction` of them after the point. */
  readonly fixedPoint: { readonly bits: Bits; readonly fraction: number };
  readonly rounding: Rounding;
  readonly halfTurn: HalfTurn;
  readonly edges: Edges;
  /** Columns scrolled together by the column pass, in pixels. */
  readonly columnGroup: number;
}

/** The defaults of every optional field of an effect document (spec §7). */
export const EFFECT_DEFAULTS = {
  fixedPoint: { bits: 16, fraction: 8 },
  rounding: "nearest-away",
  halfTurn: "flip",
  edges: "wrap",
  columnGroup: 1,
  sweep: { easing: "linear", includeEnd: false },
} as const;

function show(value: unknown): string {
  if (value === undefined) return "nothing";
  if (typeof value === "string") return JSON.stringify(value);
  if (typeof value === "number") return String(value);
  try {
    const text = JSON.stringify(value);
    return text.length > 40 ? `${text.slice(0, 37)}...` : text;
  } catch {
    // Too deep to write out: String() of a list recurses as deep as JSON.stringify does, so it is not asked.
    return Array.isArray(value) ? "a list nested too deep to show" : String(value);
  }
}

/** A zod error callback that always reports the value received and the allowed range. */
function expect(allowed: string) {
  return (issue: { input?: unknown }) =>
    issue.input === undefined ? `required; allowed ${allowed}` : `${show(issue.input)} is not allowed; allowed ${allowed}`;
}

function wholeNumber(min: number, max: number) {
  const allowed = `a whole number from ${min} to ${max}`;
  return z
    .number({ error: expect(allowed) })
    .int({ error: expect(allowed) })
    .min(min, { error: expect(allowed) })
    .max(max, { error: expect(allowed) });
}

function finiteNumber(what: string) {
  return z.number({ error: expect(what) }).refine(Number.isFinite, { error: expect(what) });
}

function oneOf<const T extends readonly [string, ...string[]]>(words: T) {
  return z.enum(words, { error: expect(`one of ${words.map((w) => `"${w}"`).join(", ")}`) });
}

function strict<T extends z.ZodRawShape>(shape: T, name: string) {
  return z.strictObject(shape, {
    error: (issue) =>
      issue.code === "unrecognized_keys"
        ? `unknown field ${issue.keys.map((k) => `"${k}"`).join(", ")}; allowed fields: ${Object.keys(shape).join(", ")}`
        : expect(`an object (${name})`)(issue),
  });
}

const { min: cMin, max: cMax } = LIMITS.canvas;
const { min: fMin, max: fMax } = LIMITS.frames;

const sweepSchema = strict(
  {
    from: finiteNumber("a finite number of degrees"),
    to: finiteNumber("a finite number of degrees"),
    frames: wholeNumber(fMin, fMax),
    easing: oneOf(EASINGS).default(EFFECT_DEFAULTS.sweep.easing),
    includeEnd: z.boolean({ error: expect("true or false") }).default(EFFECT_DEFAULTS.sweep.includeEnd),
  },
  "from, to, frames, easing, includeEnd",
);

const listSchema = z
  .array(finiteNumber("a finite number of degrees"), { error: expect(`a list of ${fMin} to ${fMax} angles in degrees`) })
  .min(fMin, { error: expect(`a list of ${fMin} to ${fMax} angles in degrees`) })
  .max(fMax, { error: (i) => `${(i.input as unknown[]).length} angles is too many; allowed ${fMin} to ${fMax}` });

const anglesSchema = z.union([strict({ list: listSchema }, "list"), strict({ sweep: sweepSchema }, "sweep")], {
  error: (issue) => expect('{"list": [degrees, …]} or {"sweep": {from, to, frames, easing, includeEnd}}')(issue),
});

const effectSchema = strict(
  {
    format: z.literal(EFFECT_FORMAT, { error: expect(`"${EFFECT_FORMAT}"`) }).default(EFFECT_FORMAT),
    canvas: strict({ width: wholeNumber(cMin, cMax), height: wholeNumber(cMin, cMax) }, "width, height"),
    pivot: strict(
      {
        x: finiteNumber("a multiple of 0.5 inside the canvas"),
        y: finiteNumber("a multiple of 0.5 inside the canvas"),
      },
      "x, y",
    ),
    angles: anglesSchema,
    fixedPoint: strict(
      {
        bits: z
          .union(LIMITS.bits.map((b) => z.literal(b)) as unknown as [z.ZodLiteral<8>, z.ZodLiteral<16>, z.ZodLiteral<32>], {
            error: expect(`one of ${LIMITS.bits.join(", ")}`),
          })
          .default(EFFECT_DEFAULTS.fixedPoint.bits),
        fraction: wholeNumber(0, 31).default(EFFECT_DEFAULTS.fixedPoint.fraction),
      },
      "bits, fraction",
    ).default({ ...EFFECT_DEFAULTS.fixedPoint }),
    rounding: oneOf(ROUNDINGS).default(EFFECT_DEFAULTS.rounding),
    halfTurn: oneOf(HALF_TURNS).default(EFFECT_DEFAULTS.halfTurn),
    edges: oneOf(EDGES).default(EFFECT_DEFAULTS.edges),
    columnGroup: wholeNumber(1, cMax).default(EFFECT_DEFAULTS.columnGroup),
  },
  "format, canvas, pivot, angles, fixedPoint, rounding, halfTurn, edges, columnGroup",
);

const canvasShape = effectSchema.shape.canvas.shape;
const pivotShape = effectSchema.shape.pivot.shape;
/** Each axis on its own, so one bad axis does not hide a problem on the other. */
const sizeOnly = {
  x: z.object({ canvas: z.object({ width: canvasShape.width }) }),
  y: z.object({ canvas: z.object({ height: canvasShape.height }) }),
};
const pivotOnly = {
  x: z.object({ pivot: z.object({ x: pivotShape.x }) }),
  y: z.object({ pivot: z.object({ y: pivotShape.y }) }),
};
const fixedOnly = z.object({ fixedPoint: effectSchema.shape.fixedPoint });
const groupOnly = z.object({ columnGroup: effectSchema.shape.columnGroup });

/** Checks between fields (pivot inside the canvas, fraction below bits, group within the width), run on every field that is valid by itself so all issues come out at once. */
function crossFieldIssues(input: unknown): EffectIssue[] {
  const issues: EffectIssue[] = [];
  const width = sizeOnly.x.safeParse(input);
  const height = sizeOnly.y.safeParse(input);
  const sizes = {
    x: width.success ? width.data.canvas.width : LIMITS.canvas.max,
    y: height.success ? height.data.canvas.height : LIMITS.canvas.max,
  };
  for (const axis of ["x", "y"] as const) {
    const pivot = pivotOnly[axis].safeParse(input);
    if (!pivot.success) continue;
    const p = (pivot.data.pivot as Record<"x" | "y", number>)[axis];
    const size = sizes[axis];
    if (!Number.isInteger(p / LIMITS.pivotStep) || p < 0 || p > size)
      issues.push({
        path: `pivot.${axis}`,
        message: `${show(p)} is not allowed; allowed a multiple of ${LIMITS.pivotStep} from 0 to ${size}`,
      });
  }
  const fixed = fixedOnly.safeParse(input);
  if (fixed.success) {
    const { bits, fraction } = fixed.data.fixedPoint;
    if (fraction >= bits)
      issues.push({
        path: "fixedPoint.fraction",
        message: `${fraction} is not allowed; allowed a whole number from 0 to ${bits - 1} (below bits = ${bits})`,
      });
  }
  const group = groupOnly.safeParse(input);
  if (group.success && width.success && group.data.columnGroup > width.data.canvas.width)
    issues.push({
      path: "columnGroup",
      message: `${group.data.columnGroup} is not allowed; allowed a whole number from 1 to ${width.data.canvas.width} (the canvas width)`,
    });
  return issues;
}

function pathText(path: readonly PropertyKey[]): string {
  return path.reduce<string>(
    (text, key) => (typeof key === "number" ? `${text}[${key}]` : text ? `${text}.${String(key)}` : String(key)),
    "",
  );
}

/** Flattens zod issues, opening union failures so the message names the deepest field at fault. */
function flatten(issues: readonly z.core.$ZodIssue[], prefix: readonly PropertyKey[] = []): EffectIssue[] {
  const out: EffectIssue[] = [];
  for (const issue of issues) {
    const path = [...prefix, ...issue.path];
    if (issue.code === "invalid_union" && issue.errors.length > 0) {
      // Pick the alternative whose keys matched (its errors are not about unknown keys at the top).
      const branches = issue.errors.filter((branch) => !branch.some((b) => b.code === "unrecognized_keys" && b.path.length === 0));
      if (branches.length === 1) {
        out.push(...flatten(branches[0], path));
        continue;
      }
    }
    out.push({ path: pathText(path), message: issue.message });
  }
  return out;
}

/** Validates an effect document and fills in the defaults; the result is ok with the effect, or not ok with every issue. */
export function checkEffect(input: unknown): { ok: true; effect: Effect } | { ok: false; issues: EffectIssue[] } {
  const result = effectSchema.safeParse(input);
  const issues = [...(result.success ? [] : flatten(result.error.issues)), ...crossFieldIssues(input)];
  if (result.success && issues.length === 0) return { ok: true, effect: result.data as Effect };
  return { ok: false, issues };
}

/** Validates an effect document and fills in the defaults; throws EffectError naming every bad field. */
export function parseEffect(input: unknown): Effect {
  const result = checkEffect(input);
  if (!result.ok) throw new EffectError(result.issues);
  return result.effect;
}
