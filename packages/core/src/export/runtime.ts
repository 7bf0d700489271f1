import type { Rounding } from "../limits.ts";
import { cComment } from "./c.ts";
import { parameterLines, wrapWords } from "./header.ts";
import type { ExportLayout } from "./layout.ts";

/** The C function the run-time routine defines: fills one frame's whole h and v tables from its coefficients kα, kβ. */
export function runtimeFunctionName(label: string): string {
  return `${label}_frame_tables`;
}

/** Rounds n / 2^s the way the effect's rounding rule does, in C, with shifts of non-negative values only (portable: C99 6.5.7 leaves >> of negatives to the compiler). */
function roundingLines(rounding: Rounding, s: number, half: string, mask: string): string[] {
  switch (rounding) {
    case "nearest-away":
      return ["/* nearest-away: round half away from zero */", `r = n >= 0 ? (n + ${half}) >> ${s} : -((-n + ${half}) >> ${s});`];
    case "nearest-up":
      return ["/* nearest-up: floor(x + 1/2) */", `n += ${half};`, `r = n >= 0 ? n >> ${s} : -((-n + ${mask}) >> ${s});`];
    case "floor":
      return ["/* floor: toward minus infinity */", `r = n >= 0 ? n >> ${s} : -((-n + ${mask}) >> ${s});`];
    case "trunc":
      return ["/* trunc: toward zero */", `r = n >= 0 ? n >> ${s} : -((-n) >> ${s});`];
  }
}

/**
 * `L_runtime.c`: a C routine that computes one frame's h and v tables on the target from kα and kβ with integer
 * additions and shifts only (one multiply per table to start), same rounding, sign convention and register wrap as
 * the exported tables.
 */
export function runtimeSource(layout: ExportLayout): string {
  const L = layout.label;
  const { effect, options } = layout;
  const { width: W, height: H } = effect.canvas;
  const F = effect.fixedPoint.fraction;
  const g = effect.columnGroup;
  const p2x = effect.pivot.x * 2;
  const p2y = effect.pivot.y * 2;
  const s = F + 1;
  const E = layout.element.c;
  const fn = runtimeFunctionName(L);

  // The accumulator holds k·t for every row and column plus one step past the last, and the rounding offset.
  const kMax = 2 ** (effect.fixedPoint.bits - 1);
  const tRow = Math.max(Math.abs(1 - p2y), Math.abs(2 * H + 1 - p2y));
  const lastGroup = Math.floor((W - 1) / g) * g;
  const tCol = Math.max(Math.abs(g - p2x), Math.abs(2 * (lastGroup + g) + g - p2x));
  const bound = kMax * Math.max(tRow, tCol) + 2 ** (s + 1);
  const wide = bound > 2 ** 31 - 1;
  const acc = `${L}_acc`;
  // Beyond 32767, written as shifts of the accumulator type: such a literal would be a long on 16-bit int compilers
  // (cc65 warns) and, with an L suffix, a conversion from long on 64-bit hosts (gcc -Wconversion warns).
  const half = 2 ** F <= 32767 ? String(2 ** F) : `((${acc})1 << ${F})`;
  const mask = 2 ** s - 1 <= 32767 ? String(2 ** s - 1) : `(((${acc})1 << ${s}) - 1)`;

  const out: string[] = [];
  if (options.sign === "scroll") out.push("/* scroll sign: the register takes the negated shift */", "r = -r;");
  let result = `(${E})r`;
  if (options.registerBits !== null) {
    const m =
      options.registerBits === 32
        ? ""
        : ` & 0x${(2 ** options.registerBits - 1).toString(16).toUpperCase()}${options.registerBits > 16 ? "UL" : "u"}`;
    result = `(${E})((uint32_t)r${m})`;
    out.push(
      `/* ${options.registerBits}-bit register: wrap modulo 2^${options.registerBits} (conversion to uint32_t is modulo 2^32, C99 6.3.1.3) */`,
    );
  }

  const lines = [
    ...cComment([
      ...parameterLines(layout),
      "",
      ...wrapWords(
        `${L}_runtime.c computes one frame's h and v tables on the target, for teams that cannot spare the ROM for them: ` +
          "keep only the alpha, beta and flip tables. Integer arithmetic only: one multiply per table, then one addition " +
          "per row or column group and a shift by the fraction bits plus one. The rounding, sign convention and register " +
          `wrap are those of the exported tables, so the result equals ${L}_h and ${L}_v of the frame entry for entry ` +
          "(whole tables, also when the export stores half tables or low/high bytes).",
      ),
      ...wrapWords(`Call ${fn}(alpha, beta, h, v) with room for ${H} elements in h and ${W} in v, of type ${E}.`),
      ...wrapWords(
        `Accumulator: ${wide ? "int64_t (this format's products need more than 31 bits; cc65 has no 64-bit type, so on the 6502 keep the tables instead)" : "int32_t"}.`,
      ),
    ]),
    "#include <stdint.h>",
    "",
    `typedef ${wide ? "int64_t" : "int32_t"} ${acc};`,
    "",
    `void ${fn}(int32_t alpha, int32_t beta, ${E} *h, ${E} *v);`,
    "",
    `/* One table entry: R(n / 2^${s}) for n = k * t, t in half-pixels (k scaled by 2^${F}). */`,
    `static ${E} ${L}_entry(${acc} n)`,
    "{",
    `    ${acc} r;`,
    ...roundingLines(effect.rounding, s, half, mask).map((l) => `    ${l}`),
    ...out.map((l) => `    ${l}`),
    `    return ${result};`,
    "}",
    "",
    `void ${fn}(int32_t alpha, int32_t beta, ${E} *h, ${E} *v)`,
    "{",
    `    ${acc} n;`,
    `    ${acc} step;`,
    "    int i;",
    ...(g > 1 ? [`    ${E} e;`, "    int j;"] : []),
    `    /* row i sits at t = 2i + 1 - ${p2y} half-pixels from the pivot; t grows by 2 per row */`,
    `    n = (${acc})alpha * (${1 - p2y});`,
    `    step = (${acc})alpha * 2;`,
    `    for (i = 0; i < ${H}; i++) {`,
    `        h[i] = ${L}_entry(n);`,
    "        n += step;",
    "    }",
    g > 1
      ? `    /* a group of ${g} columns takes the shift at its centre, t = 2i + ${g} - ${p2x}; t grows by ${2 * g} per group */`
      : `    /* column i sits at t = 2i + 1 - ${p2x} half-pixels from the pivot; t grows by 2 per column */`,
    `    n = (${acc})beta * (${g - p2x});`,
    `    step = (${acc})beta * ${2 * g};`,
    ...(g > 1
      ? [
          `    for (i = 0; i < ${W}; i += ${g}) {`,
          `        e = ${L}_entry(n);`,
          `        for (j = i; j < i + ${g} && j < ${W}; j++)`,
          "            v[j] = e;",
          "        n += step;",
          "    }",
        ]
      : [`    for (i = 0; i < ${W}; i++) {`, `        v[i] = ${L}_entry(n);`, "        n += step;", "    }"]),
    "}",
    "",
  ];
  return lines.join("\n");
}
