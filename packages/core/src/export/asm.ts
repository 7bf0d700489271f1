import { parameterLines, tableSummaryLines } from "./header.ts";
import type { ExportLayout, LayoutTable } from "./layout.ts";
import type { StorageType } from "./storageType.ts";

/** How one assembler dialect spells the pieces of a data file; `assemblySource` prints any layout with it. */
export interface AsmDialect {
  /** Line comment prefix, written in column 1. */
  readonly comment: string;
  /** The data directive for 1-, 2- and 4-byte elements. */
  readonly data: Readonly<Record<1 | 2 | 4, string>>;
  /** A value as an operand of the data directive (it is already inside the table's type range). */
  readonly operand: (value: number, type: StorageType) => string;
  /** A line that makes a symbol visible to the linker. */
  readonly global: (name: string) => string;
  /** A line that defines a constant. */
  readonly constant: (name: string, value: number) => string;
  /** The line that switches to read-only data. */
  readonly section: string;
  /** A line that aligns to `bytes` (2 or 4), or null for a target that needs no alignment. */
  readonly align: ((bytes: 2 | 4) => string) | null;
  /** ELF symbol type and size lines for a table, or none. */
  readonly objectInfo: ((name: string, bytes: number) => string[]) | null;
  /** How the file's byte order works, and how to assemble and use it: comment lines for the header. */
  readonly usage: (layout: ExportLayout) => string[];
}

/** Directive operands per source line, by element size: keeps lines near 80 columns. */
const PER_LINE: Readonly<Record<1 | 2 | 4, number>> = { 1: 16, 2: 12, 4: 8 };

const INDENT = "        ";

function tableLines(dialect: AsmDialect, layout: ExportLayout, t: LayoutTable): string[] {
  const c = dialect.comment;
  const out = [`${c} ${t.name}: ${t.type.name} [${t.dims.join("][")}], ${t.bytes} bytes`];
  const size = t.type.bytes;
  if (dialect.align && size > 1) out.push(`${INDENT}${dialect.align(size as 2 | 4)}`);
  if (dialect.objectInfo) out.push(...dialect.objectInfo(t.name, t.bytes).map((l) => INDENT + l));
  out.push(`${t.name}:`);
  const per = PER_LINE[size];
  const directive = `${INDENT}${dialect.data[size]}`.padEnd(INDENT.length + 8);
  // A table holds few distinct values (shifts of a few hundred pixels at most), so each is spelled once.
  const spelled = new Map<number, string>();
  const operand = (v: number): string => {
    let text = spelled.get(v);
    if (text === undefined) {
      text = dialect.operand(v, t.type);
      spelled.set(v, text);
    }
    return text;
  };
  const block = (values: readonly number[]) => {
    const lines: string[] = [];
    for (let i = 0; i < values.length; i += per)
      lines.push(
        `${directive}${values
          .slice(i, i + per)
          .map(operand)
          .join(", ")}`,
      );
    return lines.join("\n");
  };
  if (t.rows === null) {
    out.push(block(t.values));
    return out;
  }
  // Each distinct row is formatted once; frames sharing a row share its text.
  const blocks = new Map<readonly number[], string>();
  t.rows.forEach((row, u) => {
    let text = blocks.get(row);
    if (text === undefined) {
      text = block(row);
      blocks.set(row, text);
    }
    out.push(`${c} ${layout.frameNotes[u]}`, text);
  });
  return out;
}

/** Prints an export layout as one assembler source file in the given dialect: header, constants, exported labels, tables. */
export function assemblySource(layout: ExportLayout, dialect: AsmDialect): string {
  return assemblyLines(layout, dialect).join("\n");
}

/**
 * assemblySource as pieces to join with "\n" (a piece may hold several lines): frames that share a row share one
 * piece, so a zip can encode the file from them without building the whole text first.
 */
export function assemblyLines(layout: ExportLayout, dialect: AsmDialect): string[] {
  const c = dialect.comment;
  const comment = (lines: readonly string[]) => lines.map((l) => (l ? `${c} ${l}` : c));
  const lines = [
    ...comment(parameterLines(layout)),
    c,
    ...comment(dialect.usage(layout)),
    c,
    ...comment(["tables, in this order:", ...tableSummaryLines(layout).map((l) => `  ${l}`)]),
    "",
    ...layout.constants.map((k) => INDENT + dialect.global(k.name)),
    ...layout.tables.map((t) => INDENT + dialect.global(t.name)),
    "",
  ];
  for (const k of layout.constants) lines.push(`${c} ${k.description}`, dialect.constant(k.name, k.value));
  lines.push("", `${INDENT}${dialect.section}`);
  for (const t of layout.tables) lines.push("", ...tableLines(dialect, layout, t));
  lines.push("");
  return lines;
}
