import { compileTables, type CompiledTables } from "./compileTables.ts";
import type { Effect } from "./effect.ts";
import type { ElementType } from "./elementType.ts";

/** Format tag of a tables document (spec §8). */
export const TABLES_FORMAT = "skewsmith.tables/1";

/** One frame of a tables document, as JSON (spec §8). */
export interface TablesDocumentFrame {
  index: number;
  degrees: number;
  residualDegrees: number;
  flip: boolean;
  alpha: number;
  beta: number;
  h: number[];
  v: number[];
  maxErrorPx: number;
  meanErrorPx: number;
  wrapped: number;
  clipped: number;
  saturated: boolean;
  maxAbsShift: number;
}

/** The tables document printed by `skewsmith tables` (spec §8). */
export interface TablesDocument {
  format: typeof TABLES_FORMAT;
  effect: Effect;
  elementType: ElementType;
  frames: TablesDocumentFrame[];
}

/** Turns compiled tables into the plain JSON tables document of spec §8, keys in the spec's order. */
export function tablesDocument(tables: CompiledTables): TablesDocument {
  return {
    format: TABLES_FORMAT,
    effect: tables.effect,
    elementType: tables.elementType,
    frames: tables.frames.map((f) => ({
      index: f.index,
      degrees: f.degrees,
      residualDegrees: f.residualDegrees,
      flip: f.flip,
      alpha: f.alpha,
      beta: f.beta,
      h: Array.from(f.h),
      v: Array.from(f.v),
      maxErrorPx: f.maxErrorPx,
      meanErrorPx: f.meanErrorPx,
      wrapped: f.wrapped,
      clipped: f.clipped,
      saturated: f.saturated,
      maxAbsShift: f.maxAbsShift,
    })),
  };
}

/**
 * The tables document of an effect as the text `skewsmith tables` prints: one JSON object and a newline, indented by two
 * spaces when `pretty`. The command line and the app's API both print through this, so their bytes are the same.
 */
export function tablesText(effect: Effect, options: { readonly pretty?: boolean } = {}): string {
  const tables = compileTables(effect);
  return `${options.pretty ? JSON.stringify(tablesDocument(tables), null, 2) : tablesDocumentText(tables)}\n`;
}

/** Collapses every array of numbers in indented JSON onto one line, `[1, -2, 3]`, so that frames stay readable. */
export function collapseNumberArrays(json: string): string {
  return json.replace(/\[\s+(-?[\d.eE+-]+(?:,\s+-?[\d.eE+-]+)*)\s+\]/g, (_, body: string) => `[${body.split(/,\s+/).join(", ")}]`);
}

/** The text of shift tables as the tables document prints them (`[1, -2, 3]` indented, `[1,-2,3]` not), by table. */
export interface TableListTexts {
  readonly indent: boolean;
  readonly texts: Map<ArrayLike<number>, string>;
}

/** A table's text from `lists`, printed and kept there when it is new. */
function listText(lists: TableListTexts, t: Int32Array): string {
  let s = lists.texts.get(t);
  if (s === undefined) {
    s = `[${t.join(lists.indent ? ", " : ",")}]`;
    lists.texts.set(t, s);
  }
  return s;
}

/**
 * The h and v tables of `frames` printed as tablesDocumentText will print them: done ahead, while a long track's
 * diagnostics are still being measured on worker threads, the document after them has only the figures left to print.
 */
export function tableListTexts(frames: readonly { readonly h: Int32Array; readonly v: Int32Array }[], indent: boolean): TableListTexts {
  const lists: TableListTexts = { indent, texts: new Map() };
  for (const f of frames) {
    listText(lists, f.h);
    listText(lists, f.v);
  }
  return lists;
}

/**
 * The tables document (spec §8) as JSON text, the very text `JSON.stringify(tablesDocument(tables))` gives (or, with
 * `indent`, that of `JSON.stringify(…, null, 2)` with every array of numbers on one line), written straight from the
 * typed arrays. Frames that share a table (compileShifts shares one per coefficient) share its text too, so a long track
 * formats each distinct table once instead of building and printing an array of numbers per frame. `lists` holds
 * tables already printed with the same `indent` (tableListTexts), and takes those printed here.
 */
export function tablesDocumentText(tables: CompiledTables, indent = false, lists: TableListTexts = tableListTexts([], indent)): string {
  if (lists.indent !== indent)
    throw new RangeError(`lists: printed with indent ${lists.indent}; allowed only lists printed with indent ${indent}`);
  const list = (t: Int32Array): string => listText(lists, t);
  const num = (x: number) => JSON.stringify(x);
  const parts: string[] = [];
  if (!indent) {
    parts.push(
      `{"format":${JSON.stringify(TABLES_FORMAT)},"effect":${JSON.stringify(tables.effect)},"elementType":${JSON.stringify(tables.elementType)},"frames":[`,
    );
    tables.frames.forEach((f, i) => {
      parts.push(
        `${i ? "," : ""}{"index":${f.index},"degrees":${num(f.degrees)},"residualDegrees":${num(f.residualDegrees)},"flip":${f.flip},"alpha":${f.alpha},"beta":${f.beta},"h":${list(f.h)},"v":${list(f.v)},"maxErrorPx":${num(f.maxErrorPx)},"meanErrorPx":${num(f.meanErrorPx)},"wrapped":${f.wrapped},"clipped":${f.clipped},"saturated":${f.saturated},"maxAbsShift":${f.maxAbsShift}}`,
      );
    });
    parts.push("]}");
    return parts.join("");
  }
  const effect = collapseNumberArrays(JSON.stringify(tables.effect, null, 2).replace(/\n/g, "\n  "));
  parts.push(
    `{\n  "format": ${JSON.stringify(TABLES_FORMAT)},\n  "effect": ${effect},\n  "elementType": ${JSON.stringify(tables.elementType)},\n  "frames": [`,
  );
  tables.frames.forEach((f, i) => {
    parts.push(
      `${i ? "," : ""}\n    {\n      "index": ${f.index},\n      "degrees": ${num(f.degrees)},\n      "residualDegrees": ${num(f.residualDegrees)},\n      "flip": ${f.flip},\n      "alpha": ${f.alpha},\n      "beta": ${f.beta},\n      "h": ${list(f.h)},\n      "v": ${list(f.v)},\n      "maxErrorPx": ${num(f.maxErrorPx)},\n      "meanErrorPx": ${num(f.meanErrorPx)},\n      "wrapped": ${f.wrapped},\n      "clipped": ${f.clipped},\n      "saturated": ${f.saturated},\n      "maxAbsShift": ${f.maxAbsShift}\n    }`,
    );
  });
  parts.push("\n  ]\n}");
  return parts.join("");
}
