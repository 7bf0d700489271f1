/**
 * How a target profile's settings reach an effect that follows it: the document fields the profile owns are
 * replaced, the pivot is kept where it makes sense on the new canvas, and core validates the result.
 * Pure functions: no database, no request.
 */
import { parseEffect, type Effect } from "@skewsmith/core";
import type { ProfileFieldChange } from "../db/schema.ts";
import { qNotation } from "../effects/display.ts";
import type { ProfileSettings } from "../effects/settings.ts";

/** A profile's export settings, as stored (dialects are core output names; options are core export options). */
export interface ProfileExportSettings {
  dialects: readonly string[];
  labelPrefix: string;
  exportOptions: Record<string, unknown>;
}

const canvasText = (w: number, h: number) => `${w} × ${h}`;
const pointText = (x: number, y: number) => `(${x}, ${y})`;

/** The document-level settings of a profile or an effect, each as the text people read. */
function documentFacts(s: ProfileSettings): [field: string, label: string, text: string][] {
  return [
    ["canvas", "Canvas", canvasText(s.canvasWidth, s.canvasHeight)],
    ["fixedPoint", "Fixed point", `${qNotation({ bits: s.fixedPointBits, fraction: s.fixedPointFraction })} (${s.fixedPointBits} bits)`],
    ["rounding", "Rounding", s.rounding],
    ["halfTurn", "Half-turn", s.halfTurn],
    ["edges", "Edges", s.edges],
    ["columnGroup", "Column group", `${s.columnGroup} px`],
  ];
}

/** The profile-owned settings of an effect document, in a profile's shape. */
export function settingsOfDocument(document: Effect): ProfileSettings {
  return {
    canvasWidth: document.canvas.width,
    canvasHeight: document.canvas.height,
    fixedPointBits: document.fixedPoint.bits,
    fixedPointFraction: document.fixedPoint.fraction,
    rounding: document.rounding,
    halfTurn: document.halfTurn,
    edges: document.edges,
    columnGroup: document.columnGroup,
  };
}

/** What differs between two sets of profile settings, field by field (empty when nothing does). */
export function settingsChanges(before: ProfileSettings, after: ProfileSettings): ProfileFieldChange[] {
  const a = documentFacts(before);
  const b = documentFacts(after);
  return a.flatMap(([field, label, from], i) => (from === b[i][2] ? [] : [{ field, label, from, to: b[i][2] }]));
}

/** Which profile-owned settings of an effect differ from its profile (say, after someone edited the canvas in the bench). */
export function profileDrift(document: Effect, profile: ProfileSettings): ProfileFieldChange[] {
  return settingsChanges(settingsOfDocument(document), profile);
}

const outputsText = (dialects: readonly string[]) => (dialects.length ? dialects.join(", ") : "every output");
const optionText = (options: Record<string, unknown>) => {
  const entries = Object.entries(options).filter(([, v]) => v !== undefined);
  return entries.length ? entries.map(([k, v]) => `${k} ${v === null ? "none" : String(v)}`).join(", ") : "core defaults";
};

/** What differs between two sets of export settings (dialects, label prefix, options). */
export function exportChanges(before: ProfileExportSettings, after: ProfileExportSettings): ProfileFieldChange[] {
  const out: ProfileFieldChange[] = [];
  if (outputsText(before.dialects) !== outputsText(after.dialects))
    out.push({ field: "dialects", label: "Export dialects", from: outputsText(before.dialects), to: outputsText(after.dialects) });
  if (before.labelPrefix !== after.labelPrefix)
    out.push({ field: "labelPrefix", label: "Label prefix", from: before.labelPrefix || "none", to: after.labelPrefix || "none" });
  if (optionText(before.exportOptions) !== optionText(after.exportOptions))
    out.push({
      field: "exportOptions",
      label: "Export options",
      from: optionText(before.exportOptions),
      to: optionText(after.exportOptions),
    });
  return out;
}

/**
 * Where the pivot goes when the canvas changes: a pivot at the old canvas's centre moves to the new centre; any
 * other pivot stays where it is, pulled inside the new canvas when it would fall outside (shear-core.md §1:
 * 0 ≤ px ≤ W, 0 ≤ py ≤ H, multiples of 0.5, so the clamped value is still a multiple of 0.5).
 */
export function carriedPivot(pivot: Effect["pivot"], before: Effect["canvas"], after: Effect["canvas"]): Effect["pivot"] {
  if (pivot.x * 2 === before.width && pivot.y * 2 === before.height) return { x: after.width / 2, y: after.height / 2 };
  return { x: Math.min(pivot.x, after.width), y: Math.min(pivot.y, after.height) };
}

/**
 * The document of a following effect after its profile's settings flow in, with what changed in it (the pivot
 * included when it moved). Throws core's EffectError if the result is not a valid effect.
 */
export function applyProfileToDocument(document: Effect, profile: ProfileSettings): { document: Effect; changes: ProfileFieldChange[] } {
  const canvas = { width: profile.canvasWidth, height: profile.canvasHeight };
  const pivot = carriedPivot(document.pivot, document.canvas, canvas);
  const next = parseEffect({
    ...document,
    canvas,
    pivot,
    fixedPoint: { bits: profile.fixedPointBits, fraction: profile.fixedPointFraction },
    rounding: profile.rounding,
    halfTurn: profile.halfTurn,
    edges: profile.edges,
    columnGroup: profile.columnGroup,
  });
  const changes = settingsChanges(settingsOfDocument(document), profile);
  if (pivot.x !== document.pivot.x || pivot.y !== document.pivot.y)
    changes.push({ field: "pivot", label: "Pivot", from: pointText(document.pivot.x, document.pivot.y), to: pointText(pivot.x, pivot.y) });
  return { document: next, changes };
}
