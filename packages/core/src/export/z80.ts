import { assemblySource, type AsmDialect } from "./asm.ts";
import type { ExportLayout } from "./layout.ts";

/** Z80 and SM83 data in GNU as z80 syntax: `.db`/`.dw` (and `.4byte` for 32-bit values), little-endian, no alignment. */
export const z80Dialect: AsmDialect = {
  comment: ";",
  // GNU as z80 has no 32-bit .d* directive (".dd" and ".dl" are unknown in binutils 2.40); ".4byte" is the generic one.
  data: { 1: ".db", 2: ".dw", 4: ".4byte" },
  operand: (value) => String(value),
  global: (name) => `.globl  ${name}`,
  constant: (name, value) => `        .equ    ${name}, ${value}`,
  section: ".section .rodata",
  align: null,
  objectInfo: null,
  usage: (layout) => [
    "dialect: GNU as for the Z80 and the SM83 (Game Boy); little-endian, no alignment.",
    `assemble: z80-unknown-coff-as ${layout.label}.z80.s -o ${layout.label}.z80.o`,
    "(-march=gbz80 for the SM83); the tables go to section .rodata in this order.",
  ],
};

/** The tables as a Z80/SM83 source file for GNU as (`L.z80.s`). */
export function z80Source(layout: ExportLayout): string {
  return assemblySource(layout, z80Dialect);
}
