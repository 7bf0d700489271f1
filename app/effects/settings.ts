/**
 * Effect settings for the app: the document a new effect starts from and target-profile settings.
 * Every document goes through core's parseEffect.
 */
import { EDGES, EFFECT_FORMAT, HALF_TURNS, LIMITS, ROUNDINGS, parseEffect, type Effect } from "@skewsmith/core";
import { z } from "zod";
import { descriptionText, nameText } from "../forms.ts";
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

const whole = (min: number, max: number, what: string) =>
  z.coerce
    .number({ error: `${what} must be a number.` })
    .int(`${what} must be a whole number.`)
    .min(min, `${what} must be from ${min} to ${max}.`)
    .max(max, `${what} must be from ${min} to ${max}.`);

/** A target profile as entered: names, and settings checked against core's ranges. */
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
  dialects: z.array(nameText("export dialect", 32)).max(16, "Choose at most 16 export dialects.").default([]),
  labelPrefix: z
    .string()
    .trim()
    .max(32)
    .regex(/^[A-Za-z_][A-Za-z0-9_]*$|^$/, "A label prefix is letters, digits and underscores, not starting with a digit.")
    .default(""),
});
export type TargetProfileInput = z.output<typeof targetProfileInput>;
