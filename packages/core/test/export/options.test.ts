import { describe, expect, it } from "vitest";
import { compileTables } from "../../src/compileTables.ts";
import { parseEffect } from "../../src/effect.ts";
import { tablesDocument } from "../../src/tablesDocument.ts";
import { exportBundle } from "../../src/export/bundle.ts";
import { ExportOptionError } from "../../src/export/exportOptionError.ts";
import { checkLabel, labelFromName } from "../../src/export/label.ts";
import { exportLayout } from "../../src/export/layout.ts";
import { EXPORT_OUTPUTS, resolveExportOptions } from "../../src/export/options.ts";
import { CASES } from "./cases.ts";

const effectOf = (id: string) => parseEffect(CASES.find((c) => c.id.startsWith(id))!.effect);

function optionError(f: () => unknown): ExportOptionError {
  try {
    f();
  } catch (error) {
    if (error instanceof ExportOptionError) return error;
    throw error;
  }
  throw new Error("no ExportOptionError thrown");
}

describe("label prefixes", () => {
  it("accepts identifiers that C, C++ and the four assemblers all take", () => {
    for (const label of ["compass", "Wide32", "storm_fx", "q17", "x1"]) expect(checkLabel(label)).toBe(label);
  });

  it.each([
    ["int", "C or C++ keyword"], // C99 6.4.1 (from memory)
    ["class", "C or C++ keyword"], // C++ [lex.key] (from memory)
    ["d0", "register"], // 68000 data register (GNU as m68k)
    ["HL", "register"], // Z80 register pair, assemblers ignore case (GNU as z80)
    ["r15", "register"], // ARM program counter alias (GNU as arm)
    ["_tables", "C99 7.1.3"], // leading underscore reserved at file scope (from memory)
    ["spin_", "__"], // "spin__h" would hold "__", reserved in C++ [lex.name] (from memory)
    ["spin__fx", "__"],
    ["9lives", "starting with a letter"],
    ["spin-fx", "letters, digits and underscores"],
    // C99 5.2.4.1 guarantees 31 significant characters in external names: L_alpha_lo and L_alpha_hi must differ within them.
    ["a".repeat(24), "more than 23"],
    ["", "empty"],
  ])("rejects %j, naming the field, the value and the allowed form (%s)", (label, why) => {
    const e = optionError(() => checkLabel(label));
    expect(e.field).toBe("label");
    expect(e.message).toContain(`label: ${JSON.stringify(label)} is not allowed`);
    expect(e.message).toContain(why);
    expect(e.message).toContain("allowed a letter followed by");
  });

  it("makes the default label from the effect name", () => {
    expect(labelFromName("Compass rose")).toBe("compass_rose");
    expect(labelFromName("3D spin!")).toBe("fx_3d_spin");
    expect(labelFromName("Ñandú dance")).toBe("nandu_dance");
    expect(labelFromName("int")).toBe("int_fx");
    expect(labelFromName("***")).toBe("effect");
    expect(labelFromName("x".repeat(50))).toHaveLength(23);
    expect(checkLabel("a".repeat(23))).toHaveLength(23);
    expect(resolveExportOptions({ name: "Storm tilt" }).label).toBe("storm_tilt");
  });
});

describe("export options", () => {
  it("defaults to every output, the shift sign, auto element and no packing", () => {
    expect(resolveExportOptions({ label: "fx" })).toEqual({
      label: "fx",
      name: null,
      outputs: EXPORT_OUTPUTS,
      sign: "shift",
      registerBits: null,
      element: "auto",
      split: false,
      half: false,
      dedupe: false,
    });
  });

  it.each([
    [{ sign: "up" }, "sign", 'one of "shift", "scroll"'],
    [{ registerBits: 0 }, "registerBits", "a whole number from 1 to 32"],
    [{ registerBits: 9.5 }, "registerBits", "a whole number from 1 to 32"],
    [{ element: "int64" }, "element", '"auto", "int8", "uint8", "int16", "uint16", "int32", "uint32"'],
    [{ outputs: [] }, "outputs", "a non-empty list"],
    [{ outputs: ["c", "pdf"] }, "outputs", '"6502"'],
    [{ split: "yes" }, "split", "true or false"],
    [{ colour: "red" }, "colour", "only the options"],
  ])("rejects %j naming the option and what is allowed", (input, field, allowed) => {
    const e = optionError(() => resolveExportOptions(input as never));
    expect(e.field).toBe(field);
    expect(e.message).toContain(`${field}: `);
    expect(e.message).toContain(allowed);
  });

  it("refuses a forced element type that cannot hold the values, naming the range and the types that would", () => {
    // tan(85°) ≈ 11.4 over 100 rows: shifts of about ±1143 px (see cases.ts), beyond int8.
    const e = optionError(() => exportLayout(effectOf("wide, int16"), { label: "w", element: "int8" }));
    expect(e.field).toBe("element");
    expect(e.message).toMatch(/the exported values run from -\d{4} to \d{4}; int8 holds -128 to 127/);
    expect(e.message).toContain('"int16"');
    expect(e.message).not.toContain('"uint16"');
  });

  it("auto is the spec's element type of the tables document for the shift sign", () => {
    for (const c of CASES.filter((x) => !x.options.element && !x.options.registerBits && !x.options.sign)) {
      const effect = parseEffect(c.effect);
      expect(exportLayout(effect, { label: "fx" }).element.name, c.id).toBe(tablesDocument(compileTables(effect)).elementType);
    }
  });

  it("wraps values into an unsigned register and picks the smallest unsigned type of that many bits", () => {
    const layout = exportLayout(effectOf("storm"), { label: "st", registerBits: 9 });
    expect(layout.element.name).toBe("uint16");
    expect(exportLayout(effectOf("storm"), { label: "st", registerBits: 8 }).element.name).toBe("uint8");
    for (const t of layout.tables.filter((x) => x.role === "h" || x.role === "v"))
      for (const v of t.values) expect(v >= 0 && v < 512).toBe(true);
  });
});

describe("half tables, split and dedupe", () => {
  it("are refused where the tables are not antisymmetric, with the first entry that breaks it", () => {
    // Floor rounding with 2048 rows: floor(x) and -floor(-x) differ for every non-integer x (spec §4).
    const e = optionError(() => exportLayout(effectOf("tall"), { label: "t", half: true }));
    expect(e.field).toBe("half");
    expect(e.reason).toMatch(/h is not antisymmetric: frame \d+ has h\[\d+\] = -?\d+ but h\[\d+\] = -?\d+/);
    expect(e.reason).toContain("v is not antisymmetric");
  });

  it("halve only the table that is antisymmetric and say why the other is whole", () => {
    // Column groups of 4 on 15 columns are not symmetric about the pivot at 7.5 (groups 0-3, 4-7, 8-11, 12-14).
    const layout = exportLayout(effectOf("odd"), { label: "odd", half: true, registerBits: 9 });
    expect(layout.halfH).toBe(true);
    expect(layout.halfV).toBe(false);
    expect(layout.hEntries).toBe(5); // ceil(9 / 2): rows 0..4, the middle row 4 is 0
    expect(layout.notes.join(" ")).toContain("v is stored whole");
    const bundle = exportBundle(effectOf("odd"), { label: "odd", half: true, registerBits: 9 });
    expect(bundle.files.find((f) => f.name === "odd.h")!.text).toContain("half tables: h only");
  });

  it("split is refused when no table holds 16-bit values", () => {
    const e = optionError(() => exportLayout(effectOf("q1.7"), { label: "q", split: true }));
    expect(e.field).toBe("split");
    expect(e.reason).toContain("no table holds 16-bit values");
  });

  it("dedupe stores a repeated angle once: frames 0, 4 and 8 of a 0, 6, 12, 6, 0, -6, -12, -6, 0 track share a frame", () => {
    const layout = exportLayout(effectOf("storm"), { label: "st", dedupe: true });
    expect(layout.storedFrames).toBe(5);
    expect(layout.tables.find((t) => t.role === "frame")!.values).toEqual([0, 1, 2, 1, 0, 3, 4, 3, 0]);
  });
});
