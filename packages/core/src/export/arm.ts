import { assemblySource, type AsmDialect } from "./asm.ts";
import type { ExportLayout } from "./layout.ts";

/** ARM data in GNU as syntax: `.byte`/`.hword`/`.word`, natural alignment, byte order of the assembler (little-endian by default). */
export const armDialect: AsmDialect = {
  comment: "@",
  data: { 1: ".byte", 2: ".hword", 4: ".word" },
  operand: (value) => String(value),
  global: (name) => `.global ${name}`,
  constant: (name, value) => `        .equ    ${name}, ${value}`,
  section: ".section .rodata",
  align: (bytes) => `.balign ${bytes}`,
  // "@" starts a comment on ARM, so the symbol type is written with "%" (GNU as manual, .type).
  objectInfo: (name, bytes) => [`.type   ${name}, %object`, `.size   ${name}, ${bytes}`],
  usage: (layout) => [
    "dialect: GNU as for ARM (ARM and Thumb code alike); values follow the assembler's",
    "byte order: little-endian by default (the .le.bin file), -mbig-endian gives .be.bin;",
    "16-bit tables are 2-byte aligned, 32-bit tables 4-byte aligned.",
    `assemble: arm-none-eabi-as ${layout.label}.arm.s -o ${layout.label}.arm.o; the tables go to`,
    "section .rodata in this order.",
  ],
};

/** The tables as an ARM source file for GNU as (`L.arm.s`). */
export function armSource(layout: ExportLayout): string {
  return assemblySource(layout, armDialect);
}
