import { EDGES, ELEMENT_CHOICES, EXPORT_OUTPUTS, HALF_TURNS, LIMITS, REGISTER_BITS, ROUNDINGS, SIGNS } from "@skewsmith/core";
import { PROFILE_LABEL_PREFIX_MAX } from "../effects/settings.ts";
import { SPRITE_COLOURS } from "../sprites/colours.ts";
import type { ProfileFormOptions } from "./form.ts";

/** The choices of the target profile form, from core's own lists (for loaders to pass to the page). */
export function profileFormOptions(): ProfileFormOptions {
  return {
    bits: [...LIMITS.bits],
    roundings: [...ROUNDINGS],
    halfTurns: [...HALF_TURNS],
    edges: [...EDGES],
    outputs: [...EXPORT_OUTPUTS],
    signs: [...SIGNS],
    elements: [...ELEMENT_CHOICES],
    registerBits: { ...REGISTER_BITS },
    canvas: { ...LIMITS.canvas },
    labelPrefixMax: PROFILE_LABEL_PREFIX_MAX,
    colours: { ...SPRITE_COLOURS },
  };
}
