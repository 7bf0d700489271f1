import { assemblySource, type AsmDialect } from "./asm.ts";
import type { ExportLayout } from "./layout.ts";
import { twosComplement } from "./storageType.ts";

/** The ca65 dialect (cc65 suite) for the 6502 and 65816: little-endian `.byte`/`.word`/`.dword`, operands as two's complement hex because ca65 range-checks them as unsigned. */
export const ca65Dialect: AsmDialect = {
  comment: ";",
  data: { 1: ".byte", 2: ".word", 4: ".dword" },
  // ca65 rejects -3 in .byte and .word ("Range error (-3 not in [0..65535])", checked with ca65 2.19).
  operand: (value, type) =>
    `$${twosComplement(value, type.bytes)
      .toString(16)
      .toUpperCase()
      .padStart(type.bytes * 2, "0")}`,
  global: (name) => `.export ${name}`,
  constant: (name, value) => `${name} = ${value}`,
  section: '.segment "RODATA"',
  align: null,
  objectInfo: null,
  usage: (layout) => [
    "dialect: ca65 (cc65 suite), 6502 and 65816; little-endian (.word and .dword",
    "store the low byte first); negative values are written in two's complement.",
    `assemble: ca65 ${layout.label}.6502.s (add --cpu 65816 for the 65816), link with`,
    'ld65 and .import the labels; the tables go to segment "RODATA", no alignment.',
  ],
};

/** The tables as a ca65 source file for the 6502/65816 family (`L.6502.s`). */
export function ca65Source(layout: ExportLayout): string {
  return assemblySource(layout, ca65Dialect);
}
