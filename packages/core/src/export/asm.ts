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
  const row = t.dims.length === 2 ? t.dims[1] : t.values.length;
  const per = PER_LINE[size];
  const directive = `${INDENT}${dialect.data[size]}`.padEnd(INDENT.length + 8);
  for (let start = 0; start < t.values.length; start += row) {
    if (t.dims.length === 2) out.push(`${c} ${layout.frameNotes[start / row]}`);
    for (let i = start; i < start + row; i += per) {
      const ops = t.values.slice(i, Math.min(i + per, start + row)).map((v) => dialect.operand(v, t.type));
      out.push(`${directive}${ops.join(", ")}`);
    }
  }
  return out;
}

/** Prints an export layout as one assembler source file in the given dialect: header, constants, exported labels, tables. */
export function assemblySource(layout: ExportLayout, dialect: AsmDialect): string {
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
  return lines.join("\n");
}
