// Every export is checked against the real tools it is meant for: ca65/ld65 (cc65), GNU as for m68k, ARM and Z80,
// gcc and g++, and unzip. The bytes the tools put under each label must equal what the issue says the label holds,
// computed from the reference frames (refFrames: the spec's words in BigInt and 60-digit arithmetic, not the core) by
// expected.ts, and the raw binaries.
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { parseEffect, type Effect } from "../../src/effect.ts";
import { exportBundle, type ExportBundle } from "../../src/export/bundle.ts";
import type { TablesDocument } from "../../src/tablesDocument.ts";
import { CASES, expectedOptions } from "./cases.ts";
import { cType, encode, expectedTables, exported, type ExpectedTable } from "./expected.ts";
import { refFrames, type RefFrameTables } from "../helpers/reference.ts";
import { ld65Labels, nmSymbols, run, runBytes, runProgram, toolPath, TOOLS, type Tool } from "./toolchain.ts";

const TIMEOUT = 120_000;
const STRICT_C = ["-std=c99", "-Wall", "-Wextra", "-pedantic", "-Werror"];
const STRICT_CXX = ["-x", "c++", "-std=c++11", "-Wall", "-Wextra", "-pedantic", "-Werror"];

// ld65 memory layout: one read-only area from address 0, so a label's address is its offset in the output file.
const LD65_CONFIG = `MEMORY { ROM: start = $0000, size = $1000000, file = %O; }
SEGMENTS { RODATA: load = ROM, type = ro; }
`;

function hex(bytes: Uint8Array): string {
  return Buffer.from(bytes).toString("hex");
}

it("every tool the export tests use is installed (from the Debian packages in scripts/system-packages.txt)", () => {
  for (const tool of Object.keys(TOOLS) as Tool[]) expect(toolPath(tool)).toMatch(new RegExp(`${tool.replace(/\+/g, "\\+")}$`));
});

describe.each(CASES)("export of $id", (c) => {
  let dir: string;
  let bundle: ExportBundle;
  let doc: TablesDocument;
  let ref: { effect: Effect; frames: RefFrameTables[] };
  let tables: ExpectedTable[];
  const L = c.options.label;
  const o = expectedOptions(c);
  const file = (name: string) => join(dir, name);

  beforeAll(() => {
    dir = mkdtempSync(join(tmpdir(), "skewsmith-export-"));
    bundle = exportBundle(parseEffect(c.effect), c.options);
    for (const f of bundle.files) writeFileSync(file(f.name), f.bytes);
    doc = JSON.parse(readFileSync(file(`${L}.json`), "utf8")) as TablesDocument;
    const effect = parseEffect(c.effect);
    ref = { effect, frames: refFrames(effect) };
    tables = expectedTables(ref, o);
  }, TIMEOUT);
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  /** Checks the constants an assembler defined, as its own symbol output reports them. */
  function expectConstants(symbols: Map<string, number>) {
    expect(symbols.get(`${L}_FRAMES`)).toBe(ref.frames.length);
    expect(symbols.get(`${L}_WIDTH`)).toBe(ref.effect.canvas.width);
    expect(symbols.get(`${L}_HEIGHT`)).toBe(ref.effect.canvas.height);
    expect(symbols.get(`${L}_FRACTION`)).toBe(ref.effect.fixedPoint.fraction);
  }

  /** Checks that the bytes at each label's offset in `image` are the label's expected values in the given byte order. */
  function expectLabels(image: Uint8Array, offsets: Map<string, number>, little: boolean) {
    for (const t of tables) {
      const at = offsets.get(t.name);
      expect(at, `offset of ${t.name}`).toBeTypeOf("number");
      const want = encode(t, little);
      expect(hex(image.subarray(at!, at! + want.length)), t.name).toBe(hex(want));
    }
  }

  it("the bundle's tables document holds the reference frames: angles, flips, coefficients and whole tables", () => {
    expect(doc.frames).toHaveLength(ref.frames.length);
    doc.frames.forEach((f, i) => {
      const r = ref.frames[i];
      expect([f.index, f.flip, f.alpha, f.beta, f.saturated], `frame ${i}`).toEqual([r.index, r.flip, r.alpha, r.beta, r.saturated]);
      expect(f.degrees).toBe(r.degrees);
      expect(f.residualDegrees).toBe(r.residualDegrees);
      expect(f.h, `frame ${i} h`).toEqual(r.h);
      expect(f.v, `frame ${i} v`).toEqual(r.v);
    });
  });

  it(
    "ca65 assembles it for the 6502 and the 65816 without a warning, and ld65 puts the expected bytes under every label",
    () => {
      writeFileSync(file("ld65.cfg"), LD65_CONFIG);
      for (const cpu of ["6502", "65816"]) {
        run("ca65", ["-W", "2", "--cpu", cpu, "-o", `${L}.${cpu}.o`, `${L}.6502.s`], dir);
        run("ld65", ["-C", "ld65.cfg", "-o", `${L}.${cpu}.img`, "-Ln", `${L}.${cpu}.lbl`, `${L}.${cpu}.o`], dir);
        const image = new Uint8Array(readFileSync(file(`${L}.${cpu}.img`)));
        const labels = ld65Labels(readFileSync(file(`${L}.${cpu}.lbl`), "utf8"));
        expectConstants(labels);
        expectLabels(image, labels, true);
        // No padding on the 6502: the image is the tables back to back (ld65's own output size).
        expect(image.length).toBe(tables.reduce((a, t) => a + t.values.length * t.bytes, 0));
        expect(bundle.budget.outputs.find((x) => x.output === "6502")?.romBytes).toBe(image.length);
      }
    },
    TIMEOUT,
  );

  it(
    "GNU as for m68k assembles it without a warning; nm and objcopy show every label's bytes big-endian, and .rodata is L.be.bin",
    () => {
      run("m68k-linux-gnu-as", ["--fatal-warnings", "-o", `${L}.68k.o`, `${L}.68k.s`], dir);
      run("m68k-linux-gnu-objcopy", ["-O", "binary", "-j", ".rodata", `${L}.68k.o`, `${L}.68k.rodata`], dir);
      const rodata = new Uint8Array(readFileSync(file(`${L}.68k.rodata`)));
      const syms = nmSymbols("m68k-linux-gnu-nm", `${L}.68k.o`, dir);
      expectConstants(new Map([...syms].map(([k, v]) => [k, v.value])));
      const offsets = new Map([...syms].map(([k, v]) => [k, v.value]));
      expectLabels(rodata, offsets, false);
      for (const t of tables) {
        // 68000: words and longs at even addresses (an odd one is an address error; common practice).
        if (t.bytes > 1) expect(offsets.get(t.name)! % 2, `${t.name} is even`).toBe(0);
        expect(syms.get(t.name)?.size, `${t.name} size`).toBe(t.values.length * t.bytes);
        expect(bundle.budget.tables.find((b) => b.name === t.name)?.bytes).toBe(t.values.length * t.bytes);
      }
      expect(hex(rodata)).toBe(hex(readFileSync(file(`${L}.be.bin`))));
      expect(bundle.budget.outputs.find((x) => x.output === "68k")?.romBytes).toBe(rodata.length);
    },
    TIMEOUT,
  );

  it(
    "GNU as for ARM assembles it without a warning, little- and big-endian; .rodata is L.le.bin and L.be.bin",
    () => {
      for (const [flag, little, bin] of [
        ["-mlittle-endian", true, "le"],
        ["-mbig-endian", false, "be"],
      ] as const) {
        run("arm-none-eabi-as", ["--fatal-warnings", flag, "-o", `${L}.arm.${bin}.o`, `${L}.arm.s`], dir);
        run("arm-none-eabi-objcopy", ["-O", "binary", "-j", ".rodata", `${L}.arm.${bin}.o`, `${L}.arm.${bin}.rodata`], dir);
        const rodata = new Uint8Array(readFileSync(file(`${L}.arm.${bin}.rodata`)));
        const syms = nmSymbols("arm-none-eabi-nm", `${L}.arm.${bin}.o`, dir);
        const offsets = new Map([...syms].map(([k, v]) => [k, v.value]));
        expectConstants(offsets);
        expectLabels(rodata, offsets, little);
        // Natural alignment, which ARM cores before ARMv6 need for halfword and word loads (common practice).
        for (const t of tables) expect(offsets.get(t.name)! % t.bytes, `${t.name} aligned`).toBe(0);
        expect(hex(rodata)).toBe(hex(readFileSync(file(`${L}.${bin}.bin`))));
      }
    },
    TIMEOUT,
  );

  it(
    "GNU as for the Z80 and the SM83 assembles it without a warning and puts the little-endian bytes under every label",
    () => {
      for (const march of ["z80", "gbz80"]) {
        run("z80-unknown-coff-as", ["--fatal-warnings", `-march=${march}`, "-o", `${L}.${march}.o`, `${L}.z80.s`], dir);
        run("z80-unknown-coff-objcopy", ["-O", "binary", "-j", ".rodata", `${L}.${march}.o`, `${L}.${march}.rodata`], dir);
        const rodata = new Uint8Array(readFileSync(file(`${L}.${march}.rodata`)));
        const offsets = new Map([...nmSymbols("z80-unknown-coff-nm", `${L}.${march}.o`, dir)].map(([k, v]) => [k, v.value]));
        expectConstants(offsets);
        expectLabels(rodata, offsets, true);
        expect(rodata.length).toBe(tables.reduce((a, t) => a + t.values.length * t.bytes, 0));
      }
    },
    TIMEOUT,
  );

  it(
    "the binaries hold the tables in the order h, v, flip, alpha, beta (then frame) at the offsets the assemblers give",
    () => {
      const le = new Uint8Array(readFileSync(file(`${L}.le.bin`)));
      const be = new Uint8Array(readFileSync(file(`${L}.be.bin`)));
      run("m68k-linux-gnu-as", ["-o", `${L}.order.o`, `${L}.68k.s`], dir);
      const syms = nmSymbols("m68k-linux-gnu-nm", `${L}.order.o`, dir);
      const offsets = new Map([...syms].map(([k, v]) => [k, v.value]));
      expectLabels(le, offsets, true);
      expectLabels(be, offsets, false);
      const order = tables.map((t) => offsets.get(t.name)!);
      expect(order).toEqual([...order].sort((a, b) => a - b));
      // Whatever is not a table is zero padding, less than one element.
      const covered = new Uint8Array(le.length);
      for (const t of tables) covered.fill(1, offsets.get(t.name)!, offsets.get(t.name)! + t.values.length * t.bytes);
      covered.forEach((isTable, i) => {
        if (!isTable) expect(le[i], `padding byte ${i}`).toBe(0);
      });
      expect(le.length - covered.reduce((a, b) => a + b, 0)).toBeLessThan(4 * tables.length);
      expect(bundle.budget.outputs.find((x) => x.output === "bin")?.romBytes).toBe(le.length);
    },
    TIMEOUT,
  );

  it(
    "the C compiles with gcc -std=c99 -Wall -Wextra -pedantic -Werror and as C++, and a test program prints the tables' values",
    () => {
      const body = tables.map((t) => {
        const first = t.dims === 2 ? `&${t.name}[0][0]` : `&${t.name}[0]`;
        return `    {
        const ${cType(t)} *p = ${first};
        size_t n = sizeof(${t.name}) / sizeof(*p), i;
        printf("%s\\"${t.name}\\": {\\"bytes\\": %lu, \\"values\\": [", sep, (unsigned long)sizeof(${t.name}));
        for (i = 0; i < n; i++) printf("%s%lld", i ? "," : "", (long long)p[i]);
        printf("]}");
        sep = ",";
    }`;
      });
      const constants = ["FRAMES", "WIDTH", "HEIGHT", "FRACTION"].map((k) => `printf(",\\"${k}\\": %ld", (long)${L}_${k});`);
      writeFileSync(
        file("print_tables.c"),
        `#include <stdio.h>
#include "${L}.h"

int main(void)
{
    const char *sep = "";
    printf("{");
${body.join("\n")}
    ${constants.join("\n    ")}
    printf("}\\n");
    return 0;
}
`,
      );
      run("gcc", [...STRICT_C, "-c", "-o", `${L}.c.o`, `${L}.c`], dir);
      run("g++", [...STRICT_CXX, "-c", "-o", `${L}.cxx.o`, `${L}.c`], dir);
      run("gcc", [...STRICT_C, "-o", "print_c", "print_tables.c", `${L}.c.o`], dir);
      // A C++ program linking the C object: the header's extern "C" must give the C names.
      run("g++", [...STRICT_CXX, "print_tables.c", "-x", "none", `${L}.c.o`, "-o", "print_cxx"], dir);
      for (const program of ["print_c", "print_cxx"]) {
        const printed = JSON.parse(runProgram(file(program), dir)) as Record<string, { bytes: number; values: number[] } | number>;
        for (const t of tables) {
          const got = printed[t.name] as { bytes: number; values: number[] };
          expect(got.values, `${program}: ${t.name}`).toEqual(t.values);
          expect(got.bytes).toBe(t.values.length * t.bytes);
        }
        expect(printed.FRAMES).toBe(ref.frames.length);
        expect(printed.WIDTH).toBe(ref.effect.canvas.width);
        expect(printed.HEIGHT).toBe(ref.effect.canvas.height);
      }
    },
    TIMEOUT,
  );

  it(
    "the run-time routine, compiled strictly as C99 and C++, computes every frame's whole h and v tables from kα and kβ",
    () => {
      const E = `${c.element}_t`;
      const H = ref.effect.canvas.height;
      const W = ref.effect.canvas.width;
      const list = (xs: number[]) => xs.map((x) => (x === -2147483648 ? "(-2147483647 - 1)" : String(x))).join(", ");
      writeFileSync(
        file("run_frames.c"),
        `#include <stdio.h>
#include "${L}_runtime.c"

static const int32_t alphas[${ref.frames.length}] = { ${list(ref.frames.map((f) => f.alpha))} };
static const int32_t betas[${ref.frames.length}] = { ${list(ref.frames.map((f) => f.beta))} };

int main(void)
{
    static ${E} h[${H}], v[${W}];
    int f, i;
    for (f = 0; f < ${ref.frames.length}; f++) {
        ${L}_frame_tables(alphas[f], betas[f], h, v);
        printf("[[");
        for (i = 0; i < ${H}; i++) printf("%s%lld", i ? "," : "", (long long)h[i]);
        printf("],[");
        for (i = 0; i < ${W}; i++) printf("%s%lld", i ? "," : "", (long long)v[i]);
        printf("]]\\n");
    }
    return 0;
}
`,
      );
      run("gcc", [...STRICT_C, "-Wconversion", "-c", "-o", "runtime.o", `${L}_runtime.c`], dir);
      run("g++", [...STRICT_CXX, "-c", "-o", "runtime.cxx.o", `${L}_runtime.c`], dir);
      run("gcc", [...STRICT_C, "-o", "run_frames", "run_frames.c"], dir);
      const lines = runProgram(file("run_frames"), dir).trim().split("\n");
      expect(lines).toHaveLength(ref.frames.length);
      lines.forEach((line, f) => {
        const [h, v] = JSON.parse(line) as [number[], number[]];
        expect(h, `frame ${f} h`).toEqual(ref.frames[f].h.map((s) => exported(s, o)));
        expect(v, `frame ${f} v`).toEqual(ref.frames[f].v.map((s) => exported(s, o)));
      });
    },
    TIMEOUT,
  );

  it(
    "the C tables and the run-time routine compile without a warning for the targets: cc65, SDCC (Z80, SM83), ARM Thumb and m68k gcc",
    () => {
      // 16-bit int on cc65 and SDCC: constants beyond ±32767 need their L suffix, or cc65 warns "Constant is long".
      const compilers: [Tool, string[]][] = [
        ["cl65", ["-t", "none", "-c"]],
        ["sdcc", ["-mz80", "-c"]],
        ["sdcc", ["-msm83", "-c"]],
        ["arm-none-eabi-gcc", ["-mthumb", ...STRICT_C, "-c"]],
        // A 68000 homebrew target is bare metal, with no Linux C library: freestanding, GCC's own <stdint.h> serves (and
        // Debian's libc6-dev-m68k-cross, only recommended by the compiler, is not needed).
        ["m68k-linux-gnu-gcc", ["-ffreestanding", ...STRICT_C, "-c"]],
      ];
      const runtime = readFileSync(file(`${L}_runtime.c`), "utf8");
      // cc65 has no 64-bit integer type: a format whose products need one keeps its tables on the 6502 (the file says so).
      const needs64 = runtime.includes("typedef int64_t");
      if (needs64) expect(runtime.replace(/\n \* /g, " ")).toContain("cc65 has no 64-bit type");
      for (const [tool, flags] of compilers) {
        const tag = `${tool}${flags[0]}`.replace(/[^\w]/g, "_");
        run(tool, [...flags, "-o", `${tag}.tables.o`, `${L}.c`], dir);
        if (!(tool === "cl65" && needs64)) run(tool, [...flags, "-o", `${tag}.runtime.o`, `${L}_runtime.c`], dir);
      }
    },
    TIMEOUT,
  );

  it(
    "the zip opens with unzip, passes its test and lists every file, each with the bundle's bytes",
    () => {
      writeFileSync(file("bundle.zip"), bundle.zip);
      run("unzip", ["-tq", "bundle.zip"], dir, false);
      const listing = run("unzip", ["-Z1", "bundle.zip"], dir).trim().split("\n");
      const names = [
        `README.txt`,
        `${L}.h`,
        `${L}.c`,
        `${L}.6502.s`,
        `${L}.68k.s`,
        `${L}.arm.s`,
        `${L}.z80.s`,
        `${L}.le.bin`,
        `${L}.be.bin`,
        `${L}.json`,
        `${L}_runtime.c`,
        `${L}.effect.json`,
      ];
      expect([...listing].sort()).toEqual([...names].sort());
      for (const f of bundle.files) expect(hex(runBytes("unzip", ["-p", "bundle.zip", f.name], dir)), f.name).toBe(hex(f.bytes));
      const readme = bundle.files.find((f) => f.name === "README.txt")!.text!;
      for (const n of names) expect(readme).toContain(n);
    },
    TIMEOUT,
  );
});

it(
  "an effect name with comment delimiters, trigraphs, backslashes and non-ASCII letters leaves every file plain ASCII that still builds",
  () => {
    const dir = mkdtempSync(join(tmpdir(), "skewsmith-name-"));
    try {
      const name = "Rosé */ /* ??/ back\\slash\nnew line";
      const bundle = exportBundle(parseEffect(CASES[0].effect), { name, label: "rose" });
      for (const f of bundle.files) {
        writeFileSync(join(dir, f.name), f.bytes);
        if (f.text !== null) expect(/^[\n\x20-\x7e]*$/.test(f.text), f.name).toBe(true);
      }
      // gcc -Wall warns on "/*" inside a comment (-Wcomment) and on trigraphs (-Wtrigraphs); -Werror makes those fail.
      run("gcc", [...STRICT_C, "-c", "-o", "rose.o", "rose.c"], dir);
      run("gcc", [...STRICT_C, "-c", "-o", "rose_runtime.o", "rose_runtime.c"], dir);
      run("ca65", ["-o", "rose.6502.o", "rose.6502.s"], dir);
      run("m68k-linux-gnu-as", ["--fatal-warnings", "-o", "rose.68k.o", "rose.68k.s"], dir);
      run("arm-none-eabi-as", ["--fatal-warnings", "-o", "rose.arm.o", "rose.arm.s"], dir);
      run("z80-unknown-coff-as", ["--fatal-warnings", "-o", "rose.z80.o", "rose.z80.s"], dir);
      expect(bundle.files.find((f) => f.name === "rose.h")!.text).toContain('of effect "Rose * / / * ?_/ back/slash_new line"');
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  },
  TIMEOUT,
);
