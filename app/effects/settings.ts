/**
 * Effect settings for the app: the document a new effect starts from and target-profile settings.
 * Every document goes through core's parseEffect.
 */
import {
  checkLabel,
  EDGES,
  EFFECT_FORMAT,
  ELEMENT_CHOICES,
  EXPORT_DEFAULTS,
  EXPORT_OUTPUTS,
  ExportOptionError,
  HALF_TURNS,
  LABEL_ALLOWED,
  LIMITS,
  REGISTER_BITS,
  ROUNDINGS,
  SIGNS,
  parseEffect,
  type Effect,
} from "@skewsmith/core";
import { z } from "zod";
import { descriptionText, nameText } from "../forms.ts";
import { SPRITE_COLOURS } from "../sprites/colours.ts";
import { NEW_EFFECT_CANVAS, NEW_EFFECT_FRAMES } from "./display.ts";

/** The settings a target profile fixes for the effects that use it. */
export interface ProfileSettings {
  canvasWidth: number;
  canvasHeight: number;
  fixedPointBits: number;
  fixedPointFraction: number;
  rounding: string;
  halfTurn: string;
  edges: string;
  columnGroup: number;
}

/**
 * The document a new effect starts from: the profile's canvas and arithmetic (or a 64 × 64 canvas and
 * core's defaults), the pivot at the canvas centre, and a full-turn sweep. Validated by core.
 */
export function newEffectDocument(profile?: ProfileSettings): Effect {
  const width = profile?.canvasWidth ?? NEW_EFFECT_CANVAS;
  const height = profile?.canvasHeight ?? NEW_EFFECT_CANVAS;
  return parseEffect({
    format: EFFECT_FORMAT,
    canvas: { width, height },
    pivot: { x: width / 2, y: height / 2 },
    angles: { sweep: { from: 0, to: 360, frames: NEW_EFFECT_FRAMES } },
    ...(profile && {
      fixedPoint: { bits: profile.fixedPointBits, fraction: profile.fixedPointFraction },
      rounding: profile.rounding,
      halfTurn: profile.halfTurn,
      edges: profile.edges,
      columnGroup: profile.columnGroup,
    }),
  });
}

/**
 * A whole number from `min` to `max`, typed or sent as text. Blank text is no number (left to itself, coercion would
 * read it as 0, so an emptied field would save as 0 wherever 0 is allowed).
 */
const whole = (min: number, max: number, what: string) =>
  z.preprocess(
    (v) => (typeof v === "string" && v.trim() === "" ? undefined : v),
    z.coerce
      .number({ error: `${what} must be a whole number from ${min} to ${max}.` })
      .int(`${what} must be a whole number.`)
      .min(min, `${what} must be from ${min} to ${max}.`)
      .max(max, `${what} must be from ${min} to ${max}.`),
  );

/** Longest label prefix of a target profile, in characters: it leaves room for the effect's own name in the label (see profileLabel). */
export const PROFILE_LABEL_PREFIX_MAX = 12;

/** The export options a target profile may set beyond its dialects and label prefix (each validated by core's resolveExportOptions). */
export const profileExportOptions = z.strictObject(
  {
    sign: z.enum(SIGNS, { error: `Sign must be one of ${SIGNS.join(", ")}.` }).optional(),
    registerBits: z
      .number({ error: `Register width must be a whole number from ${REGISTER_BITS.min} to ${REGISTER_BITS.max}, or none.` })
      .int(`Register width must be a whole number from ${REGISTER_BITS.min} to ${REGISTER_BITS.max}, or none.`)
      .min(REGISTER_BITS.min, `Register width must be from ${REGISTER_BITS.min} to ${REGISTER_BITS.max} bits, or none.`)
      .max(REGISTER_BITS.max, `Register width must be from ${REGISTER_BITS.min} to ${REGISTER_BITS.max} bits, or none.`)
      .nullable()
      .optional(),
    element: z.enum(ELEMENT_CHOICES, { error: `Element type must be one of ${ELEMENT_CHOICES.join(", ")}.` }).optional(),
    split: z.boolean({ error: "Split must be true or false." }).optional(),
    half: z.boolean({ error: "Half tables must be true or false." }).optional(),
    dedupe: z.boolean({ error: "Dedupe must be true or false." }).optional(),
  },
  {
    error: (issue) =>
      issue.code === "unrecognized_keys" ? `Unknown export option ${issue.keys.join(", ")}.` : "Export options must be an object.",
  },
);
export type ProfileExportOptions = z.output<typeof profileExportOptions>;

/** A target profile as entered: names, settings checked against core's ranges, export dialects (core's output names), label prefix and options. */
export const targetProfileInput = z.object({
  name: nameText("target profile"),
  description: descriptionText(),
  canvasWidth: whole(LIMITS.canvas.min, LIMITS.canvas.max, "Canvas width"),
  canvasHeight: whole(LIMITS.canvas.min, LIMITS.canvas.max, "Canvas height"),
  fixedPointBits: z.coerce
    .number({ error: `Bits must be one of ${LIMITS.bits.join(", ")}.` })
    .refine((b) => (LIMITS.bits as readonly number[]).includes(b), `Bits must be one of ${LIMITS.bits.join(", ")}.`),
  fixedPointFraction: whole(0, 31, "Fraction bits"),
  rounding: z.enum(ROUNDINGS, { error: `Rounding must be one of ${ROUNDINGS.join(", ")}.` }),
  halfTurn: z.enum(HALF_TURNS, { error: `Half-turn must be one of ${HALF_TURNS.join(", ")}.` }),
  edges: z.enum(EDGES, { error: `Edges must be one of ${EDGES.join(", ")}.` }),
  columnGroup: whole(1, LIMITS.canvas.max, "Column group"),
  /** Outputs the profile's effects export by default, in core's order; empty means every output. */
  dialects: z
    .array(z.enum(EXPORT_OUTPUTS, { error: `Export dialects are some of ${EXPORT_OUTPUTS.join(", ")}.` }), {
      error: `Export dialects are some of ${EXPORT_OUTPUTS.join(", ")}.`,
    })
    .default([])
    .transform((chosen) => EXPORT_OUTPUTS.filter((o) => chosen.includes(o))),
  labelPrefix: z
    .string({ error: "The label prefix must be text." })
    .trim()
    .max(PROFILE_LABEL_PREFIX_MAX, `Keep the label prefix to ${PROFILE_LABEL_PREFIX_MAX} characters or fewer.`)
    .default("")
    .superRefine((value, ctx) => {
      if (value === "") return;
      try {
        checkLabel(value);
      } catch (error) {
        const reason = error instanceof ExportOptionError && error.reason ? ` (${error.reason})` : "";
        ctx.addIssue({ code: "custom", message: `The label prefix must be ${LABEL_ALLOWED}${reason}.` });
      }
    }),
  /** Most colours a sprite may use on the target; blank (or null) for no limit. */
  maxColours: z.preprocess(
    (v) => (v === undefined || v === null || (typeof v === "string" && v.trim() === "") ? null : v),
    z.coerce
      .number({
        error: `The colour limit must be a whole number from ${SPRITE_COLOURS.min} to ${SPRITE_COLOURS.max}, or empty for none.`,
      })
      .int(`The colour limit must be a whole number from ${SPRITE_COLOURS.min} to ${SPRITE_COLOURS.max}, or empty for none.`)
      .min(SPRITE_COLOURS.min, `The colour limit must be from ${SPRITE_COLOURS.min} to ${SPRITE_COLOURS.max} colours, or empty for none.`)
      .max(SPRITE_COLOURS.max, `The colour limit must be from ${SPRITE_COLOURS.min} to ${SPRITE_COLOURS.max} colours, or empty for none.`)
      .nullable(),
  ),
  /** Kept without the options that equal core's defaults, so "nothing chosen" has one form. */
  exportOptions: profileExportOptions.default({}).transform((options) => {
    const kept: ProfileExportOptions = {};
    for (const [key, value] of Object.entries(options) as [keyof ProfileExportOptions, unknown][])
      if (value !== undefined && value !== (EXPORT_DEFAULTS as Record<string, unknown>)[key])
        (kept as Record<string, unknown>)[key] = value;
    return kept;
  }),
});
export type TargetProfileInput = z.output<typeof targetProfileInput>;
