import { assemblySource, type AsmDialect } from "./asm.ts";
import type { ExportLayout } from "./layout.ts";

/** Motorola-style 68000 data (`dc.b`/`dc.w`/`dc.l`, big-endian) in the syntax GNU as for m68k accepts. */
export const m68kDialect: AsmDialect = {
  // GNU as for m68k takes "*" in column 1 as a comment, as Motorola assemblers do; ";" is not a comment there (checked with binutils 2.40).
  comment: "*",
  data: { 1: "dc.b", 2: "dc.w", 4: "dc.l" },
  operand: (value) => String(value),
  global: (name) => `.globl  ${name}`,
  constant: (name, value) => `        .equ    ${name}, ${value}`,
  section: ".section .rodata",
  // The 68000 faults on word or long access at an odd address; longs are put on 4 bytes for the 68020 and up.
  align: (bytes) => (bytes === 2 ? ".even" : ".balign 4"),
  objectInfo: (name, bytes) => [`.type   ${name}, @object`, `.size   ${name}, ${bytes}`],
  usage: (layout) => [
    "dialect: Motorola-style 68000 data for GNU as (m68k); big-endian;",
    "16-bit tables start at an even address, 32-bit tables at a multiple of 4.",
    `assemble: m68k-linux-gnu-as ${layout.label}.68k.s -o ${layout.label}.68k.o (or any m68k GNU as);`,
    "the tables go to section .rodata in this order, the same bytes as the .be.bin file.",
  ],
};

/** The tables as a 68000 source file for GNU as (`L.68k.s`). */
export function m68kSource(layout: ExportLayout): string {
  return assemblySource(layout, m68kDialect);
}
