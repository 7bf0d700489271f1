import type { CompiledTables } from "../compileTables.ts";
import { tablesDocumentText } from "../tablesDocument.ts";

/** The tables document (spec §8) as JSON text, indented, with every array of numbers kept on one line so frames stay readable. */
export function tablesJson(tables: CompiledTables): string {
  return `${tablesDocumentText(tables, true)}\n`;
}
