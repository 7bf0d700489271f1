import { budgetText, type BudgetReport } from "./budget.ts";
import { effectFileName, regenerateCommand, settingsLines, wrapWords } from "./header.ts";
import { placeTables, type ExportLayout } from "./layout.ts";
import { outputFiles } from "./files.ts";

function describeFile(layout: ExportLayout, name: string): string[] {
  const L = layout.label;
  const files = outputFiles(L);
  const is = (o: keyof typeof files, i = 0) => files[o][i] === name;
  if (is("c", 0))
    return [
      "C99 header: the constants (#define) and an extern declaration of every",
      'table; includes <stdint.h>; usable from C++ (extern "C").',
    ];
  if (is("c", 1))
    return [
      "C99 source: every table as a const array. Compile it with your build;",
      "it compiles warning-free with gcc -std=c99 -Wall -Wextra -pedantic and as C++.",
    ];
  if (is("6502"))
    return [
      "ca65 source for the 6502 and 65816: .byte/.word/.dword, little-endian,",
      'negative values in two\'s complement, segment "RODATA", no alignment.',
    ];
  if (is("68k"))
    return [
      "68000 source in Motorola style for GNU as (m68k): dc.b/dc.w/dc.l,",
      "big-endian, section .rodata, 16-bit tables even, 32-bit tables on 4 bytes.",
    ];
  if (is("arm"))
    return [
      "ARM source for GNU as: .byte/.hword/.word in the assembler's byte order",
      "(little-endian by default), section .rodata, natural alignment.",
    ];
  if (is("z80")) return ["Z80 and SM83 source for GNU as (z80): .db/.dw/.4byte, little-endian,", "section .rodata, no alignment."];
  if (is("bin", 0)) return ["Raw tables, little-endian, in the order and at the offsets listed below."];
  if (is("bin", 1)) return ["Raw tables, big-endian, same order and offsets as the .le.bin file."];
  if (is("json"))
    return [
      "The tables document (skewsmith.tables/1): every frame's angle, flip,",
      "coefficients, whole h and v tables as computed (shift sign, before any",
      "export option) and diagnostics (error in pixels, wrapped, clipped).",
    ];
  if (is("runtime"))
    return [
      "C routine that computes one frame's whole h and v tables at run time from",
      `alpha and beta, integers only: ${L}_frame_tables(alpha, beta, h, v).`,
    ];
  if (name === effectFileName(L)) return ["The effect document (skewsmith.effect/1) these files were made from."];
  if (name === "README.txt") return ["This file."];
  return [];
}

function readingLines(layout: ExportLayout): string[] {
  const L = layout.label;
  const o = layout.options;
  const mod = o.registerBits !== null ? ` (mod 2^${o.registerBits})` : "";
  const lines = [
    o.dedupe
      ? `u = ${L}_frame[i]     the stored frame of frame i; every other table is indexed by u`
      : `u = i                 (no dedupe: tables are indexed by the frame number)`,
    `flip = ${L}_flip[u]   1: turn the picture by a half turn first (mirror both axes about the pivot)`,
    `alpha = ${L}_alpha[u], beta = ${L}_beta[u]: the coefficients, scaled by 2^${L}_FRACTION`,
    `row r:    ${L}_h[u][r]${layout.halfH ? `, and for r >= ${L}_H_ENTRIES: -${L}_h[u][${L}_HEIGHT-1-r]${mod}` : ""}`,
    `column c: ${L}_v[u][c]${layout.halfV ? `, and for c >= ${L}_V_ENTRIES: -${L}_v[u][${L}_WIDTH-1-c]${mod}` : ""}`,
  ];
  if (layout.splitRoles.length)
    lines.push(
      `split tables (${layout.splitRoles.map((r) => `${L}_${r}`).join(", ")}): value = hi * 256 + lo,`,
      "  read as a signed 16-bit number for signed tables (int16_t), unsigned otherwise.",
    );
  lines.push(
    "The passes, in order: the flip, a row pass (row r moves by h[r]), a column",
    "pass (column c moves by v[c]), and the row pass again with the same h table,",
    "indexed by the row a pixel reached after the column pass.",
    o.sign === "shift"
      ? "Sign shift: +1 moves a row right and a column down."
      : "Sign scroll: values are negated for scroll registers; +1 moves a row left, a column up.",
  );
  if (o.registerBits !== null)
    lines.push(`Register width ${o.registerBits}: values wrapped modulo ${2 ** o.registerBits}, stored unsigned.`);
  return lines;
}

/** README.txt of a bundle: what each file holds, the table layout and byte order, the parameters, the budget, and how to regenerate. */
export function readmeText(layout: ExportLayout, fileNames: readonly string[], budget: BudgetReport): string {
  const L = layout.label;
  const title = `Skewsmith export bundle: ${L}`;
  const { placements, bytes } = placeTables(layout.tables, true);
  const w = Math.max(...fileNames.map((n) => n.length));
  const lines = [title, "=".repeat(title.length), "", "Files", ""];
  for (const n of fileNames) describeFile(layout, n).forEach((d, i) => lines.push(`  ${(i ? "" : n).padEnd(w)}  ${d}`.trimEnd()));
  lines.push("", "Parameters", "", ...settingsLines(layout).map((l) => `  ${l}`));
  lines.push("", "Tables", "", "Every output defines the same labels (exported / global) and constants, in this order.", "");
  for (const p of placements) {
    const t = p.table;
    lines.push(
      `  ${t.name}: ${t.type.name}[${t.dims.join("][")}], ${t.bytes} bytes, at offset ${p.offset} in the .bin files${p.padding ? ` (after ${p.padding} zero bytes)` : ""}`,
    );
    lines.push(`      declared [${t.dimNames.join("][")}]`, ...wrapWords(t.description, 72).map((l) => `      ${l}`));
  }
  lines.push(`  .bin files: ${bytes} bytes each`, "", "Constants", "");
  for (const k of layout.constants) lines.push(`  ${k.name} = ${k.value}: ${k.description}`);
  lines.push(
    "",
    "Byte order and alignment",
    "",
    `  ${L}.le.bin is little-endian (6502, 65816, Z80, SM83, ARM), ${L}.be.bin big-endian (68000).`,
    "  In both, each table starts at a multiple of its element size (2 or 4 bytes),",
    "  zero bytes between: the same bytes as the .rodata section of the 68k and ARM",
    "  sources. The ca65 and Z80 sources have no padding; their labels hold the same",
    "  bytes as the .le.bin file at the offsets above. Rows are row-major: frame by",
    "  frame, entry by entry.",
    "",
    "Reading frame i on the target",
    "",
    ...readingLines(layout).map((l) => `  ${l}`),
    "",
    "Budget",
    "",
    ...budgetText(budget)
      .trimEnd()
      .split("\n")
      .map((l) => (l ? `  ${l}` : "")),
    "",
    "Regenerate",
    "",
    "  From a Skewsmith checkout (npx --yes pnpm@10.34.9 exec skewsmith ... from its root):",
    `  ${regenerateCommand(layout)}`,
    `  with DIR the folder to write; ${effectFileName(L)} is in this bundle.`,
    "",
  );
  return lines.join("\n");
}
