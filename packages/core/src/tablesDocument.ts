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
  return `${JSON.stringify(tablesDocument(compileTables(effect)), null, options.pretty ? 2 : undefined)}\n`;
}
