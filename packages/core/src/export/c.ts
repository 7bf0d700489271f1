import { parameterLines, tableSummaryLines } from "./header.ts";
import type { ExportLayout, LayoutTable } from "./layout.ts";
import type { StorageType } from "./storageType.ts";

/**
 * An integer constant as C source that has the same value and no warning on a compiler with 16-bit int (cc65, SDCC) as
 * with 32-bit int: a value beyond ±32767 gets an L suffix (U, UL when unsigned), since without one it would be a long
 * anyway and cc65 warns "Constant is long". −32768 and −2^31 are the negation of a constant one too large for the type,
 * hence the L there too and the (−2147483647L − 1) spelling (C99 6.4.4.1; from memory).
 */
export function cConstant(value: number, unsigned = false): string {
  if (value >= -32767 && value <= 32767) return String(value);
  if (unsigned) return value <= 65535 ? `${value}u` : `${value}UL`;
  if (value === -2147483648) return "(-2147483647L - 1)";
  return `${value}L`;
}

/** A value as a C literal of the table's type that means the same on a compiler with 16-bit int (cc65, SDCC) as with 32-bit int. */
export function cLiteral(value: number, type: StorageType): string {
  return cConstant(value, !type.signed);
}

/** Lines of a C block comment. */
export function cComment(lines: readonly string[]): string[] {
  return ["/*", ...lines.map((l) => (l ? ` * ${l}` : " *")), " */"];
}

const PER_LINE: Readonly<Record<1 | 2 | 4, number>> = { 1: 16, 2: 12, 4: 8 };

function declaration(t: LayoutTable): string {
  return `const ${t.type.c} ${t.name}[${t.dimNames.join("][")}]`;
}

/** The header `L.h`: constants, and an extern declaration of every table (C99 with `<stdint.h>`, usable from C++). */
export function cHeader(layout: ExportLayout): string {
  const L = layout.label;
  const guard = `${L}_H_INCLUDED`;
  const lines = [
    ...cComment([
      ...parameterLines(layout),
      "",
      `Declarations of the tables defined in ${L}.c (C99, <stdint.h>; C++ too).`,
      "Tables:",
      ...tableSummaryLines(layout).map((l) => `  ${l}`),
    ]),
    `#ifndef ${guard}`,
    `#define ${guard}`,
    "",
    "#include <stdint.h>",
    "",
  ];
  for (const k of layout.constants) lines.push(`/* ${k.description} */`, `#define ${k.name} ${k.value}`);
  lines.push("", "#ifdef __cplusplus", 'extern "C" {', "#endif", "");
  for (const t of layout.tables) lines.push(`/* ${t.description} */`, `extern ${declaration(t)};`);
  lines.push("", "#ifdef __cplusplus", "}", "#endif", "", `#endif /* ${guard} */`, "");
  return lines.join("\n");
}

function initializer(layout: ExportLayout, t: LayoutTable): string[] {
  const per = PER_LINE[t.type.bytes];
  const row = (values: readonly number[], indent: string) => {
    const out: string[] = [];
    for (let i = 0; i < values.length; i += per) {
      const last = Math.min(i + per, values.length);
      const ops = values.slice(i, last).map((v) => cLiteral(v, t.type));
      out.push(`${indent}${ops.join(", ")}${last < values.length ? "," : ""}`);
    }
    return out.join("\n");
  };
  if (t.rows === null) return [row(t.values, "    ")];
  // Each distinct row is formatted once; frames sharing a row share its text.
  const blocks = new Map<readonly number[], string>();
  const out: string[] = [];
  t.rows.forEach((values, u) => {
    let text = blocks.get(values);
    if (text === undefined) {
      text = row(values, "        ");
      blocks.set(values, text);
    }
    out.push(`    /* ${layout.frameNotes[u]} */`, "    {", text, `    }${u + 1 < t.rows!.length ? "," : ""}`);
  });
  return out;
}

/** The source `L.c`: every table defined as a const array, for C99 and C++ compilers alike. */
export function cSource(layout: ExportLayout): string {
  return cSourceLines(layout).join("\n");
}

/** cSource as pieces to join with "\n" (a piece may hold several lines; frames that share a row share one). */
export function cSourceLines(layout: ExportLayout): string[] {
  const L = layout.label;
  const lines = [
    ...cComment([...parameterLines(layout), "", `Table definitions; declarations and constants are in ${L}.h.`]),
    `#include "${L}.h"`,
  ];
  for (const t of layout.tables) lines.push("", `/* ${t.description} */`, `${declaration(t)} = {`, ...initializer(layout, t), "};");
  lines.push("");
  return lines;
}
