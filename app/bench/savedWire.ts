/**
 * The saved diagnostics as the effect page's loader sends them: the rows as one JSON text of arrays (the fields in
 * ROW_FIELDS' order) instead of a list of objects. The framework's loader-data encoding walks every value of every row
 * in JavaScript (up to hundreds of rows of fifteen fields); one string costs it one step, and the text is made once
 * per cached answer. The rows are plain numbers, booleans and nulls, so JSON carries them whole (the diagnostics
 * JSON route sends the same rows as JSON).
 */
import type { FrameRow } from "./trackDiagnosis.ts";
import type { SavedDiagnostics } from "./saved.server.ts";

/** Every field of a row, in the order a packed row lists them. */
const ROW_FIELDS = [
  "index",
  "written",
  "degrees",
  "residualDegrees",
  "flip",
  "alpha",
  "beta",
  "saturated",
  "maxAbsShift",
  "maxErrorPx",
  "meanErrorPx",
  "wrapped",
  "clipped",
  "keyMaxErrorPx",
  "keyApart",
] as const satisfies readonly (keyof FrameRow)[];

// A field added to FrameRow and not to ROW_FIELDS fails the type check here.
type Unlisted = Exclude<keyof FrameRow, (typeof ROW_FIELDS)[number]>;
const everyFieldListed: [Unlisted] extends [never] ? true : Unlisted = true;
void everyFieldListed;

/** SavedDiagnostics with `rows` as JSON text of arrays (null when there are none). */
export type PackedDiagnostics = Omit<SavedDiagnostics, "rows"> & { rows: string | null };

const packed = new WeakMap<SavedDiagnostics, PackedDiagnostics>();
const unpacked = new WeakMap<PackedDiagnostics, SavedDiagnostics>();

/** The diagnostics for the page's loader data; the same answer object gives the same packed one. */
export function packDiagnostics(diagnostics: SavedDiagnostics): PackedDiagnostics {
  let answer = packed.get(diagnostics);
  if (!answer) {
    const rows = diagnostics.rows?.map((row) => ROW_FIELDS.map((field) => row[field]));
    answer = { ...diagnostics, rows: rows ? JSON.stringify(rows) : null };
    packed.set(diagnostics, answer);
    // On the server the page renders from the same rows it packed.
    unpacked.set(answer, diagnostics);
  }
  return answer;
}

/** The diagnostics as the page uses them, from the loader data. */
export function unpackDiagnostics(diagnostics: PackedDiagnostics): SavedDiagnostics {
  let answer = unpacked.get(diagnostics);
  if (!answer) {
    const rows =
      diagnostics.rows === null
        ? null
        : (JSON.parse(diagnostics.rows) as unknown[][]).map(
            (values) => Object.fromEntries(ROW_FIELDS.map((field, i) => [field, values[i]])) as unknown as FrameRow,
          );
    answer = { ...diagnostics, rows };
    unpacked.set(diagnostics, answer);
  }
  return answer;
}
