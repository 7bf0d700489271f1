import type { CompiledTables } from "../compileTables.ts";
import { tableListTexts, tablesDocumentText, type TableListTexts } from "../tablesDocument.ts";

/** The tables document (spec §8) as JSON text, indented, with every array of numbers kept on one line so frames stay readable. */
export function tablesJson(tables: CompiledTables): string {
  return `${tablesDocumentText(tables, true)}\n`;
}

/** Frames per piece of tablesDocumentPieces: pieces of about half a megabyte for a 320 × 240 canvas. */
export const FRAMES_PER_PIECE = 256;

/**
 * tablesDocumentText (indented or not) as pieces that join, with "", into exactly its text: the document's head, its
 * frames a few hundred at a time, its tail. Each piece is cut from tablesDocumentText of those frames alone, so the two
 * cannot disagree; a caller writes or encodes them one by one instead of building the whole text (megabytes for a long
 * track) and then an encoded copy of it.
 */
export function tablesDocumentPieces(
  tables: CompiledTables,
  indent: boolean,
  framesPerPiece: number = FRAMES_PER_PIECE,
  lists: TableListTexts = tableListTexts([], indent),
): string[] {
  if (!Number.isInteger(framesPerPiece) || framesPerPiece < 1)
    throw new RangeError(`framesPerPiece: ${framesPerPiece} is not allowed; allowed a whole number from 1`);
  const tail = indent ? "\n  ]\n}" : "]}";
  const empty = tablesDocumentText({ ...tables, frames: [] }, indent);
  if (!empty.endsWith(tail))
    throw new RangeError(`tablesDocumentText: an empty document ends ${JSON.stringify(empty.slice(-8))}, not ${JSON.stringify(tail)}`);
  const head = empty.slice(0, empty.length - tail.length);
  const pieces = [head];
  for (let a = 0; a < tables.frames.length; a += framesPerPiece) {
    const text = tablesDocumentText({ ...tables, frames: tables.frames.slice(a, a + framesPerPiece) }, indent, lists);
    if (a > 0) pieces.push(",");
    pieces.push(text.slice(head.length, text.length - tail.length));
  }
  pieces.push(tail);
  return pieces;
}
