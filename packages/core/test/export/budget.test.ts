// The budget is checked against what the assemblers actually lay down: GNU as for the Z80 (no padding) and for
// ARM (symbol sizes from nm), never against the exporter's own arithmetic.
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { parseEffect } from "../../src/effect.ts";
import { budgetText, exportBudget } from "../../src/export/budget.ts";
import { exportLayout } from "../../src/export/layout.ts";
import type { ExportOptionsInput } from "../../src/export/options.ts";
import { armSource } from "../../src/export/arm.ts";
import { z80Source } from "../../src/export/z80.ts";
import { CASES } from "./cases.ts";
import { nmSymbols, run } from "./toolchain.ts";

const dir = mkdtempSync(join(tmpdir(), "skewsmith-budget-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const effectOf = (id: string) => parseEffect(CASES.find((c) => c.id.startsWith(id))!.effect);
let n = 0;

/** Bytes of the .rodata section GNU as for the Z80 makes from the export (the Z80 source has no padding). */
function z80Bytes(id: string, options: ExportOptionsInput): number {
  const name = `b${n++}`;
  writeFileSync(join(dir, `${name}.s`), z80Source(exportLayout(effectOf(id), options)));
  run("z80-unknown-coff-as", ["--fatal-warnings", "-o", `${name}.o`, `${name}.s`], dir);
  run("z80-unknown-coff-objcopy", ["-O", "binary", "-j", ".rodata", `${name}.o`, `${name}.bin`], dir);
  return readFileSync(join(dir, `${name}.bin`)).length;
}

describe("the export budget", () => {
  it.each([
    ["storm", { label: "storm" }, "half"],
    ["storm", { label: "storm" }, "dedupe"],
    ["storm", { label: "storm", half: true }, "dedupe"],
    ["compass, defaults", { label: "compass", dedupe: true }, "half"],
    ["odd", { label: "odd", registerBits: 9 }, "half"],
  ] as const)("for %s %j says what %s would save, as the assembled sizes show", (id, options, option) => {
    const budget = exportBudget(effectOf(id), options);
    const entry = budget.options.find((o) => o.option === option)!;
    expect(entry.available).toBe(true);
    const without = z80Bytes(id, options);
    const withIt = z80Bytes(id, { ...options, [option]: true });
    expect(budget.totalBytes).toBe(without);
    expect(entry.savingBytes).toBe(without - withIt);
    // And the same option, once chosen, reports the same saving.
    const chosen = exportBudget(effectOf(id), { ...options, [option]: true });
    expect(chosen.totalBytes).toBe(withIt);
    expect(chosen.options.find((o) => o.option === option)!.savingBytes).toBe(without - withIt);
  });

  it("reports a forced element type's cost against auto, as the assembled sizes show", () => {
    const budget = exportBudget(effectOf("compass, defaults"), { label: "compass", element: "int16" });
    const element = budget.options.find((o) => o.option === "element")!;
    expect(element.savingBytes).toBe(
      z80Bytes("compass, defaults", { label: "compass" }) - z80Bytes("compass, defaults", { label: "compass", element: "int16" }),
    );
    expect(element.savingBytes).toBeLessThan(0);
  });

  it("gives bytes per label equal to the symbol sizes GNU as for ARM records, and the run-time saving as h plus v", () => {
    const options = { label: "storm", split: true, dedupe: true, registerBits: 10 };
    const budget = exportBudget(effectOf("storm"), options);
    writeFileSync(join(dir, "storm.arm.s"), armSource(exportLayout(effectOf("storm"), options)));
    run("arm-none-eabi-as", ["--fatal-warnings", "-o", "storm.arm.o", "storm.arm.s"], dir);
    const syms = nmSymbols("arm-none-eabi-nm", "storm.arm.o", dir);
    for (const t of budget.tables) expect(syms.get(t.name)?.size, t.name).toBe(t.bytes);
    const hv = ["storm_h_lo", "storm_h_hi", "storm_v_lo", "storm_v_hi"].reduce((a, k) => a + syms.get(k)!.size!, 0);
    expect(budget.runtimeSavingBytes).toBe(hv);
  });

  it("reports options that cannot apply as not available, with the reason, without failing", () => {
    const budget = exportBudget(effectOf("tall"), { label: "tall" });
    const half = budget.options.find((o) => o.option === "half")!;
    expect(half).toMatchObject({ available: false, savingBytes: null });
    expect(half.note).toContain("h is not antisymmetric");
    const split = exportBudget(effectOf("q1.7"), { label: "q17" }).options.find((o) => o.option === "split")!;
    expect(split).toMatchObject({ available: false, savingBytes: null });
  });

  it("prints every table, the total and every output as text", () => {
    const budget = exportBudget(effectOf("storm"), { label: "storm", split: true, half: true, sign: "scroll", registerBits: 10 });
    const text = budgetText(budget);
    for (const t of budget.tables) expect(text).toMatch(new RegExp(`${t.name}\\s+uint8\\s+[\\d x]+\\s+${t.bytes}\\n`));
    expect(text).toMatch(new RegExp(`total\\s+${budget.totalBytes}\\n`));
    for (const o of ["c", "6502", "68k", "arm", "z80", "bin", "json", "runtime"]) expect(text).toMatch(new RegExp(`\\n\\s+${o}\\s`));
  });
});
