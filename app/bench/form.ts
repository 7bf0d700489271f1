/**
 * The bench's settings form: one zod schema, run by the page on every keystroke and by the action on save. It builds
 * the effect document from the fields and asks core's checkEffect, so every message beside a field is core's own.
 */
import { checkEffect, EFFECT_FORMAT, type Effect, type EffectIssue } from "@skewsmith/core";
import { z } from "zod";
import { fieldErrors, versionField } from "../forms.ts";
import type { BenchState, DraftField, KeyPixel } from "./draft.ts";

/** Most key pixels one effect may mark: enough for every feature that must read well, few enough to draw on every frame. */
export const KEY_PIXELS_MAX = 256;
/** Furthest a sprite may be placed from the canvas's top-left corner, in pixels either way (the canvas's own limit). */
export const PLACEMENT_LIMIT = 4096;

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
const NUMBER = /^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/;

/**
 * A typed number as core should see it: the number when it reads as one, nothing when empty, and otherwise the text
 * itself, so that core's message quotes what the person typed. A trailing degree sign is allowed on angles.
 */
export function typedNumber(text: string, angle = false): number | string | undefined {
  let t = text.trim();
  if (angle) t = t.replace(/\s*(°|deg)$/i, "");
  if (t === "") return undefined;
  return NUMBER.test(t) ? Number(t) : text.trim();
}

/** The angle list's lines that hold an angle: their values and 1-based line numbers (blank lines are skipped). */
export function angleLines(text: string): { values: (number | string)[]; lines: number[] } {
  const values: (number | string)[] = [];
  const lines: number[] = [];
  text.split(/\r?\n/).forEach((line, i) => {
    const value = typedNumber(line, true);
    if (value === undefined) return;
    values.push(value);
    lines.push(i + 1);
  });
  return { values, lines };
}

/** Where core's document paths show in the form. */
const PATH_TO_FIELD: Record<string, DraftField> = {
  "canvas.width": "canvasWidth",
  "canvas.height": "canvasHeight",
  canvas: "canvasWidth",
  "pivot.x": "pivotX",
  "pivot.y": "pivotY",
  pivot: "pivotX",
  angles: "angleMode",
  "angles.sweep": "sweepFrom",
  "angles.sweep.from": "sweepFrom",
  "angles.sweep.to": "sweepTo",
  "angles.sweep.frames": "sweepFrames",
  "angles.sweep.easing": "sweepEasing",
  "angles.sweep.includeEnd": "sweepIncludeEnd",
  "angles.list": "angleList",
  fixedPoint: "fixedPointBits",
  "fixedPoint.bits": "fixedPointBits",
  "fixedPoint.fraction": "fixedPointFraction",
  rounding: "rounding",
  halfTurn: "halfTurn",
  edges: "edges",
  columnGroup: "columnGroup",
};

/**
 * The form path of one of core's issues: the field, and for an angle of the list also its line, as
 * ["angleList", line] (so the editor can mark every bad line).
 */
export function issuePath(issue: EffectIssue, lines: readonly number[]): (string | number)[] {
  const item = /^angles\.list\[(\d+)\]$/.exec(issue.path);
  if (item) return ["angleList", lines[Number(item[1])] ?? 1];
  return [PATH_TO_FIELD[issue.path] ?? "form"];
}

/** A message for a form field: the line it is about, then core's words. */
function issueMessage(issue: EffectIssue, path: (string | number)[]): string {
  return path[0] === "angleList" && typeof path[1] === "number" ? `Line ${path[1]}: ${issue.message}` : issue.message;
}

const checkbox = z
  .string()
  .optional()
  .transform((v) => v === "on" || v === "true");

const optionalId = (what: string) =>
  z
    .string()
    .optional()
    .transform((v) => v?.trim() ?? "")
    .refine((v) => v === "" || UUID.test(v), `That ${what} does not exist.`)
    .transform((v) => (v === "" ? null : v));

const placement = (axis: "x" | "y") =>
  z
    .string()
    .optional()
    .transform((v, ctx) => {
      const value = typedNumber(v ?? "");
      if (value === undefined) return null;
      if (typeof value !== "number" || !Number.isInteger(value) || Math.abs(value) > PLACEMENT_LIMIT) {
        ctx.addIssue({
          code: "custom",
          message: `${JSON.stringify(v)} is not allowed; allowed a whole number of pixels from −${PLACEMENT_LIMIT} to ${PLACEMENT_LIMIT}, or empty to centre the sprite on ${axis}`,
        });
        return z.NEVER;
      }
      return value;
    });

const keyPixels = z
  .string()
  .optional()
  .transform((v, ctx): KeyPixel[] => {
    if (v === undefined || v.trim() === "") return [];
    let parsed: unknown;
    try {
      parsed = JSON.parse(v);
    } catch {
      parsed = undefined;
    }
    const ok =
      Array.isArray(parsed) &&
      parsed.every((p) => Array.isArray(p) && p.length === 2 && p.every((n) => Number.isInteger(n) && Math.abs(n) <= PLACEMENT_LIMIT));
    if (!ok) {
      ctx.addIssue({ code: "custom", message: "Key pixels must be a list of [x, y] pairs of whole pixel numbers." });
      return z.NEVER;
    }
    const unique = [...new Map((parsed as KeyPixel[]).map((p) => [`${p[0]},${p[1]}`, [p[0], p[1]] as KeyPixel])).values()];
    if (unique.length > KEY_PIXELS_MAX) {
      ctx.addIssue({ code: "custom", message: `${unique.length} key pixels is too many; mark at most ${KEY_PIXELS_MAX}.` });
      return z.NEVER;
    }
    return unique;
  });

/** The fields of the settings form as posted (and as the page checks them), before they make a document. */
const fields = z.object({
  canvasWidth: z.string().default(""),
  canvasHeight: z.string().default(""),
  pivotX: z.string().default(""),
  pivotY: z.string().default(""),
  angleMode: z.enum(["sweep", "list"], { error: "Choose a sweep or a list of angles." }),
  sweepFrom: z.string().default(""),
  sweepTo: z.string().default(""),
  sweepFrames: z.string().default(""),
  sweepEasing: z.string().default(""),
  sweepIncludeEnd: checkbox,
  angleList: z.string().default(""),
  fixedPointBits: z.string().default(""),
  fixedPointFraction: z.string().default(""),
  rounding: z.string().default(""),
  halfTurn: z.string().default(""),
  edges: z.string().default(""),
  columnGroup: z.string().default(""),
  targetProfileId: optionalId("target profile"),
  followsProfile: checkbox,
  spriteId: optionalId("sprite"),
  spriteX: placement("x"),
  spriteY: placement("y"),
  keyPixels,
});

/** The names of the settings form's fields: each takes one value. */
export const BENCH_FIELDS: readonly string[] = Object.keys(fields.shape);

/** The effect document the fields describe, unchecked (core checks it), and the list's line numbers. */
export function documentFromFields(f: z.output<typeof fields>): { input: unknown; lines: number[] } {
  const n = (text: string) => typedNumber(text);
  const list = angleLines(f.angleList);
  const angles =
    f.angleMode === "list"
      ? { list: list.values }
      : {
          sweep: {
            from: typedNumber(f.sweepFrom, true),
            to: typedNumber(f.sweepTo, true),
            frames: n(f.sweepFrames),
            easing: f.sweepEasing || undefined,
            includeEnd: f.sweepIncludeEnd,
          },
        };
  return {
    input: {
      format: EFFECT_FORMAT,
      canvas: { width: n(f.canvasWidth), height: n(f.canvasHeight) },
      pivot: { x: n(f.pivotX), y: n(f.pivotY) },
      angles,
      fixedPoint: { bits: n(f.fixedPointBits), fraction: n(f.fixedPointFraction) },
      rounding: f.rounding || undefined,
      halfTurn: f.halfTurn || undefined,
      edges: f.edges || undefined,
      columnGroup: n(f.columnGroup),
    },
    lines: f.angleMode === "list" ? list.lines : [],
  };
}

/**
 * The bench's settings form, shared by the page and the action: the posted fields in, the state to save out. Every
 * problem core finds in the document comes back on the field it is about (an angle of the list on its line).
 */
export const benchForm = fields.transform((f, ctx): BenchState => {
  const { input, lines } = documentFromFields(f);
  const checked = checkEffect(input);
  if (!checked.ok) {
    for (const issue of checked.issues) {
      const path = issuePath(issue, lines);
      ctx.addIssue({ code: "custom", path, message: issueMessage(issue, path) });
    }
    return z.NEVER;
  }
  return {
    document: checked.effect as Effect,
    targetProfileId: f.targetProfileId,
    followsProfile: f.targetProfileId !== null && f.followsProfile,
    spriteId: f.spriteId,
    spriteX: f.spriteX,
    spriteY: f.spriteY,
    keyPixels: f.keyPixels,
  };
});

/** The save form: the settings and the version they started from. */
export const saveForm = z.object({ version: versionField("effect") });

/** Field messages of the settings form: one per field, and for the angle list one per bad line (keys "angleList.<line>"). */
export type BenchErrors = Record<string, string>;

/** The messages of a failed parse, every bad list line kept (keys "angleList.<line>"), the first message per other field. */
export function benchErrors(error: z.ZodError): BenchErrors {
  const out: BenchErrors = fieldErrors(error);
  const firstLine = error.issues.find((i) => i.path[0] === "angleList" && i.path.length > 1);
  if (firstLine) out.angleList ??= firstLine.message;
  return out;
}

/** The bad lines of the angle list, from the messages: line number and message, in order. */
export function badLines(errors: BenchErrors | undefined): { line: number; message: string }[] {
  if (!errors) return [];
  return Object.entries(errors)
    .filter(([key]) => /^angleList\.\d+$/.test(key))
    .map(([key, message]) => ({ line: Number(key.split(".")[1]), message }))
    .sort((a, b) => a.line - b.line);
}
