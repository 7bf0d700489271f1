import type { CompiledTables } from "../compileTables.ts";
import { tablesDocument } from "../tablesDocument.ts";

/** The tables document (spec §8) as JSON text, indented, with every array of numbers kept on one line so frames stay readable. */
export function tablesJson(tables: CompiledTables): string {
  const text = JSON.stringify(tablesDocument(tables), null, 2);
  return `${text.replace(/\[\s+(-?[\d.eE+-]+(?:,\s+-?[\d.eE+-]+)*)\s+\]/g, (_, body: string) => `[${body.split(/,\s+/).join(", ")}]`)}\n`;
}
