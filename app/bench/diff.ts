/**
 * What changed between two drafts, field by field, and a three-way merge: when someone saved the effect after you
 * opened it, the bench shows what they changed (their save against the version you started from) and can keep your
 * edits on top of theirs.
 */
import { activeFields, FIELD_LABELS, sameValue, type BenchDraft, type DraftField, type KeyPixel } from "./draft.ts";

/** One changed field: its label and the value before and after, in words. */
export interface FieldChange {
  field: DraftField;
  label: string;
  before: string;
  after: string;
}

function shown(draft: BenchDraft, field: DraftField, names: { profiles?: Map<string, string>; sprites?: Map<string, string> }): string {
  const value = draft[field];
  switch (field) {
    case "angleMode":
      return value === "sweep" ? "sweep" : "list";
    case "targetProfileId":
      return value ? (names.profiles?.get(value as string) ?? "another profile") : "own settings";
    case "spriteId":
      return value ? (names.sprites?.get(value as string) ?? "another sprite") : "none";
    case "spriteX":
    case "spriteY":
      return value === "" ? "centred" : `${value as string} px`;
    case "keyPixels": {
      const list = value as KeyPixel[];
      return list.length === 0 ? "none" : `${list.length} (${list.map(([x, y]) => `${x},${y}`).join("; ")})`;
    }
    case "angleList": {
      const lines = (value as string).split(/\r?\n/).filter((l) => l.trim() !== "");
      return `${lines.length} angle${lines.length === 1 ? "" : "s"}: ${lines.slice(0, 8).join(", ")}${lines.length > 8 ? ", …" : ""}`;
    }
    default:
      return typeof value === "boolean" ? (value ? "yes" : "no") : value === "" ? "(empty)" : String(value);
  }
}

/** A short account of how two angle lists differ: the first lines that changed. */
function listChange(before: string, after: string): string {
  const a = before.split(/\r?\n/).filter((l) => l.trim() !== "");
  const b = after.split(/\r?\n/).filter((l) => l.trim() !== "");
  const changed: string[] = [];
  for (let i = 0; i < Math.max(a.length, b.length) && changed.length < 4; i++)
    if (a[i] !== b[i]) changed.push(`angle ${i + 1}: ${a[i] ?? "(none)"} → ${b[i] ?? "(none)"}`);
  return `${a.length} → ${b.length} angles; ${changed.join("; ")}${changed.length === 4 ? "; …" : ""}`;
}

/** The fields whose values differ between `before` and `after` (the angle fields of whichever kind of track each uses). */
export function diffDrafts(
  before: BenchDraft,
  after: BenchDraft,
  names: { profiles?: Map<string, string>; sprites?: Map<string, string> } = {},
): FieldChange[] {
  const fields = new Set<DraftField>([...activeFields(before), ...activeFields(after)]);
  const changes: FieldChange[] = [];
  for (const field of Object.keys(FIELD_LABELS) as DraftField[]) {
    if (!fields.has(field) || sameValue(before[field], after[field])) continue;
    if (field === "angleList" && before.angleMode === "list" && after.angleMode === "list") {
      changes.push({
        field,
        label: FIELD_LABELS[field],
        before: shown(before, field, names),
        after: listChange(before.angleList, after.angleList),
      });
      continue;
    }
    changes.push({ field, label: FIELD_LABELS[field], before: shown(before, field, names), after: shown(after, field, names) });
  }
  return changes;
}

/** The result of a three-way merge: the merged draft and the fields both sides changed differently (yours kept). */
export interface Merge {
  draft: BenchDraft;
  clashes: DraftField[];
}

/**
 * Merges your edits with a save someone made after `base`: a field only you changed keeps your value, a field only
 * they changed takes theirs, and a field you both changed differently keeps yours and is listed as a clash.
 */
export function mergeDrafts(base: BenchDraft, mine: BenchDraft, theirs: BenchDraft): Merge {
  const draft = { ...theirs, keyPixels: theirs.keyPixels.map(([x, y]) => [x, y] as KeyPixel) } as BenchDraft;
  const clashes: DraftField[] = [];
  const set = <F extends DraftField>(field: F, value: BenchDraft[F]) => {
    draft[field] = value;
  };
  for (const field of Object.keys(FIELD_LABELS) as DraftField[]) {
    const mineChanged = !sameValue(base[field], mine[field]);
    if (!mineChanged) continue;
    const theirsChanged = !sameValue(base[field], theirs[field]);
    if (theirsChanged && !sameValue(mine[field], theirs[field])) clashes.push(field);
    set(field, mine[field]);
  }
  return { draft, clashes: clashes.filter((f) => activeFields(draft).includes(f) || f === "angleMode") };
}
