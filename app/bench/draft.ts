/**
 * The bench's draft: every setting as the person typed it (strings, so a bad value stays on screen with its
 * message), and the saved state it comes from. The form schema (form.ts) turns a draft into a state; this module
 * turns a state back into a draft and names the fields.
 */
import type { Effect } from "@skewsmith/core";

/** A key pixel, [x, y] in sprite pixels (canvas pixels when no sprite is attached). */
export type KeyPixel = [number, number];

/** What the bench saves: the effect document and what goes with it in the effects row. */
export interface BenchState {
  document: Effect;
  targetProfileId: string | null;
  followsProfile: boolean;
  spriteId: string | null;
  /** Where the sprite's top-left pixel sits in the canvas, in pixels; null centres it on that axis. */
  spriteX: number | null;
  spriteY: number | null;
  keyPixels: KeyPixel[];
}

/** Every field of the settings form, as typed. */
export interface BenchDraft {
  canvasWidth: string;
  canvasHeight: string;
  pivotX: string;
  pivotY: string;
  angleMode: "sweep" | "list";
  sweepFrom: string;
  sweepTo: string;
  sweepFrames: string;
  sweepEasing: string;
  sweepIncludeEnd: boolean;
  /** One angle in degrees per line. */
  angleList: string;
  fixedPointBits: string;
  fixedPointFraction: string;
  rounding: string;
  halfTurn: string;
  edges: string;
  columnGroup: string;
  targetProfileId: string;
  followsProfile: boolean;
  spriteId: string;
  spriteX: string;
  spriteY: string;
  keyPixels: KeyPixel[];
}

export type DraftField = keyof BenchDraft;

/** Labels of the fields, in the words of the form (used beside messages and in the list of someone else's changes). */
export const FIELD_LABELS: Record<DraftField, string> = {
  canvasWidth: "Canvas width",
  canvasHeight: "Canvas height",
  pivotX: "Pivot x",
  pivotY: "Pivot y",
  angleMode: "Angle track kind",
  sweepFrom: "Sweep from",
  sweepTo: "Sweep to",
  sweepFrames: "Frames",
  sweepEasing: "Easing",
  sweepIncludeEnd: "End angle included",
  angleList: "Angle list",
  fixedPointBits: "Bits",
  fixedPointFraction: "Fraction bits",
  rounding: "Rounding",
  halfTurn: "Half-turn rule",
  edges: "Edges",
  columnGroup: "Column group",
  targetProfileId: "Target profile",
  followsProfile: "Follows the profile",
  spriteId: "Sprite",
  spriteX: "Sprite x",
  spriteY: "Sprite y",
  keyPixels: "Key pixels",
};

/** The fields a target profile fixes while an effect follows it. */
export const PROFILE_FIELDS = [
  "canvasWidth",
  "canvasHeight",
  "fixedPointBits",
  "fixedPointFraction",
  "rounding",
  "halfTurn",
  "edges",
  "columnGroup",
] as const satisfies readonly DraftField[];

/** The fields that matter for a draft: the sweep's fields or the list, not both. */
export function activeFields(draft: BenchDraft): DraftField[] {
  const sweep: DraftField[] = ["sweepFrom", "sweepTo", "sweepFrames", "sweepEasing", "sweepIncludeEnd"];
  return (Object.keys(FIELD_LABELS) as DraftField[]).filter((f) => (draft.angleMode === "sweep" ? f !== "angleList" : !sweep.includes(f)));
}

const text = (n: number | null) => (n === null ? "" : String(n));

/** The draft that shows a saved state: every number written plainly, a list one angle per line. */
export function stateToDraft(state: BenchState): BenchDraft {
  const d = state.document;
  const angles = d.angles;
  const sweep = "sweep" in angles ? angles.sweep : null;
  return {
    canvasWidth: String(d.canvas.width),
    canvasHeight: String(d.canvas.height),
    pivotX: String(d.pivot.x),
    pivotY: String(d.pivot.y),
    angleMode: sweep ? "sweep" : "list",
    sweepFrom: String(sweep?.from ?? 0),
    sweepTo: String(sweep?.to ?? 360),
    sweepFrames: String(sweep?.frames ?? ("list" in angles ? angles.list.length : 64)),
    sweepEasing: sweep?.easing ?? "linear",
    sweepIncludeEnd: sweep?.includeEnd ?? false,
    angleList: "list" in angles ? angles.list.join("\n") : "",
    fixedPointBits: String(d.fixedPoint.bits),
    fixedPointFraction: String(d.fixedPoint.fraction),
    rounding: d.rounding,
    halfTurn: d.halfTurn,
    edges: d.edges,
    columnGroup: String(d.columnGroup),
    targetProfileId: state.targetProfileId ?? "",
    followsProfile: state.targetProfileId !== null && state.followsProfile,
    spriteId: state.spriteId ?? "",
    spriteX: text(state.spriteX),
    spriteY: text(state.spriteY),
    keyPixels: state.keyPixels.map(([x, y]) => [x, y]),
  };
}

/** The draft as form fields (what the settings form posts): strings, checkboxes as "on" or absent, key pixels as JSON. */
export function draftToFields(draft: BenchDraft): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [key, value] of Object.entries(draft) as [DraftField, BenchDraft[DraftField]][]) {
    if (key === "keyPixels") out[key] = JSON.stringify(value);
    else if (typeof value === "boolean") {
      if (value) out[key] = "on";
    } else out[key] = value as string;
  }
  return out;
}

/** True when two drafts hold the same value in every field that matters. */
export function sameDraft(a: BenchDraft, b: BenchDraft): boolean {
  if (a.angleMode !== b.angleMode) return false;
  return activeFields(a).every((f) => sameValue(a[f], b[f]));
}

/** Field values compared as the form sees them (key pixels as a set). */
export function sameValue(a: BenchDraft[DraftField], b: BenchDraft[DraftField]): boolean {
  if (Array.isArray(a) && Array.isArray(b)) {
    if (a.length !== b.length) return false;
    const key = (p: KeyPixel) => `${p[0]},${p[1]}`;
    const set = new Set(a.map(key));
    return b.every((p) => set.has(key(p)));
  }
  return a === b;
}
