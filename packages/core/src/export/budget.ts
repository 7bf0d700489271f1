import { compileShifts, type CompiledTables, type FrameTables } from "../compileTables.ts";
import type { Effect } from "../effect.ts";
import { analyseExport, type ExportAnalysis } from "./analysis.ts";
import { ExportOptionError } from "./exportOptionError.ts";
import { outputFiles } from "./files.ts";
import { placeTables, planLayout, resolveElement, type TablePlan } from "./layout.ts";
import { resolveExportOptions, type ExportOptions, type ExportOptionsInput, type ExportOutput } from "./options.ts";
import type { StorageTypeName } from "./storageType.ts";

/** One table in a budget: its symbol, type, dimensions and size in bytes. */
export interface BudgetTable {
  readonly name: string;
  readonly type: StorageTypeName;
  readonly dims: readonly number[];
  readonly bytes: number;
}

/** What one output costs: ROM bytes of its tables with that output's alignment, or null for outputs that hold no ROM data. */
export interface BudgetOutput {
  readonly output: ExportOutput;
  readonly files: readonly string[];
  /** Table bytes plus alignment padding, or null (json: not ROM data; runtime: code). */
  readonly romBytes: number | null;
  readonly paddingBytes: number;
  readonly note: string;
}

/** The export options a budget weighs. */
export const BUDGET_OPTIONS = ["element", "sign", "registerBits", "split", "half", "dedupe"] as const;

/** One option in a budget: what was chosen, whether it applies, and what it saves in bytes against the same export without it (or would save if chosen). */
export interface BudgetOption {
  readonly option: (typeof BUDGET_OPTIONS)[number];
  readonly chosen: string;
  readonly available: boolean;
  /** Bytes saved by the choice (negative: it costs bytes), or that turning it on would save; null when not available. */
  readonly savingBytes: number | null;
  readonly note: string;
}

/** The ROM cost of an export before it is made: bytes per table and in all, per output, and what each option saves. */
export interface BudgetReport {
  readonly label: string;
  readonly frames: number;
  readonly storedFrames: number;
  readonly element: StorageTypeName;
  readonly tables: readonly BudgetTable[];
  /** Sum of the tables, without padding. */
  readonly totalBytes: number;
  /** The same effect exported with no options (auto element, shift sign, no split, half or dedupe). */
  readonly baselineBytes: number;
  readonly outputs: readonly BudgetOutput[];
  readonly options: readonly BudgetOption[];
  /** Bytes of the h and v tables, which the run-time routine can compute instead. */
  readonly runtimeSavingBytes: number;
  readonly notes: readonly string[];
}

const sum = (plans: readonly TablePlan[]) => plans.reduce((a, p) => a + p.bytes, 0);

/** The table bytes for options, or null when they cannot apply to this effect. */
function bytesFor(tables: CompiledTables<FrameTables>, analysis: ExportAnalysis, options: ExportOptions): number | null {
  try {
    const element = resolveElement(analysis, options);
    return sum(planLayout({ analysis, effect: tables.effect, options, element }).plans);
  } catch (error) {
    if (error instanceof ExportOptionError) return null;
    throw error;
  }
}

function signedBytes(n: number, plural = false): string {
  return n >= 0 ? `${plural ? "save" : "saves"} ${n} bytes` : `${plural ? "cost" : "costs"} ${-n} bytes`;
}

/** The budget of an export from compiled frames and resolved options; throws ExportOptionError when the chosen options cannot apply. */
export function budgetFromTables(tables: CompiledTables<FrameTables>, options: ExportOptions): BudgetReport {
  const analysis = analyseExport(tables, options.sign, options.registerBits);
  const element = resolveElement(analysis, options);
  const plan = planLayout({ analysis, effect: tables.effect, options, element });
  const total = sum(plan.plans);
  const analysisFor = (o: ExportOptions) =>
    o.sign === options.sign && o.registerBits === options.registerBits ? analysis : analyseExport(tables, o.sign, o.registerBits);
  const variant = (change: Partial<ExportOptions>) => {
    const o = { ...options, ...change };
    return bytesFor(tables, analysisFor(o), o);
  };
  const baseline = variant({ element: "auto", sign: "shift", registerBits: null, split: false, half: false, dedupe: false }) ?? total;

  const opts: BudgetOption[] = [];
  // element
  {
    const auto = variant({ element: "auto" });
    opts.push({
      option: "element",
      chosen: options.element === "auto" ? `auto (${element.name})` : element.name,
      available: true,
      savingBytes: options.element === "auto" ? 0 : auto === null ? null : auto - total,
      note:
        options.element === "auto"
          ? `${element.name} is the smallest type holding every value (${analysis.min} to ${analysis.max})`
          : `forced; auto would store ${auto === null ? "nothing valid" : `${auto} bytes`}`,
    });
  }
  opts.push({ option: "sign", chosen: options.sign, available: true, savingBytes: 0, note: "changes the values, not their size" });
  {
    const plain = options.registerBits === null ? null : variant({ registerBits: null });
    opts.push({
      option: "registerBits",
      chosen: options.registerBits === null ? "none" : String(options.registerBits),
      available: true,
      savingBytes: options.registerBits === null ? 0 : plain === null ? null : plain - total,
      note:
        options.registerBits === null
          ? "signed values, no wrap"
          : `values wrapped into an unsigned ${options.registerBits}-bit register${plain === null ? "" : `; signed values would take ${plain} bytes`}`,
    });
  }
  {
    const on = options.split ? total : variant({ split: true });
    const sixteen = plan.plans.filter((p) => p.type.bytes === 2 || p.part !== "whole").map((p) => p.name);
    opts.push({
      option: "split",
      chosen: options.split ? "on" : "off",
      available: on !== null,
      savingBytes: on === null ? null : 0,
      note:
        on === null
          ? "not available: no table holds 16-bit values"
          : `same bytes, low and high bytes in separate tables so an 8-bit CPU reads both with one index (${options.split ? plan.splitRoles.map((r) => `${options.label}_${r}`).join(", ") : sixteen.join(", ")})`,
    });
  }
  {
    const { halfH, halfV } = analysis;
    const available = halfH.available || halfV.available;
    const other = options.half ? variant({ half: false }) : variant({ half: true });
    const which = halfH.available && halfV.available ? "h and v" : halfH.available ? "h only" : "v only";
    opts.push({
      option: "half",
      chosen: options.half ? "on" : "off",
      available,
      savingBytes: !available || other === null ? null : options.half ? other - total : total - other,
      note: available
        ? `${which} antisymmetric${!halfH.available ? ` (${halfH.reason})` : !halfV.available ? ` (${halfV.reason})` : ""}`
        : `not available: ${halfH.reason}; ${halfV.reason}`,
    });
  }
  {
    const other = options.dedupe ? variant({ dedupe: false }) : variant({ dedupe: true });
    const unique = analysis.storedFrames.length;
    const saving = other === null ? null : options.dedupe ? other - total : total - other;
    opts.push({
      option: "dedupe",
      chosen: options.dedupe ? "on" : "off",
      available: true,
      savingBytes: saving,
      note:
        unique === analysis.frames
          ? `every frame differs; the ${options.label}_frame index table ${options.dedupe ? "costs" : "would cost"} bytes for nothing`
          : `${unique} of ${analysis.frames} frames are distinct`,
    });
  }

  const files = outputFiles(options.label);
  const packed = placeTables(plan.plans, false);
  const aligned = placeTables(plan.plans, true);
  const outputs: BudgetOutput[] = options.outputs.map((output) => {
    switch (output) {
      case "c":
        return {
          output,
          files: files.c,
          romBytes: packed.bytes,
          paddingBytes: 0,
          note: "array sizes; the compiler aligns each array as its target needs",
        };
      case "6502":
      case "z80":
        return { output, files: files[output], romBytes: packed.bytes, paddingBytes: 0, note: "no alignment" };
      case "68k":
      case "arm":
        return {
          output,
          files: files[output],
          romBytes: aligned.bytes,
          paddingBytes: aligned.padding,
          note: "16-bit tables 2-byte, 32-bit tables 4-byte aligned",
        };
      case "bin":
        return {
          output,
          files: files.bin,
          romBytes: aligned.bytes,
          paddingBytes: aligned.padding,
          note: "each file; aligned like the 68k and ARM sections",
        };
      case "json":
        return { output, files: files.json, romBytes: null, paddingBytes: 0, note: "not ROM data: the tables document" };
      case "runtime":
        return {
          output,
          files: files.runtime,
          romBytes: null,
          paddingBytes: 0,
          note: "code, not data: computes h and v, so their tables can stay out of ROM",
        };
    }
  });
  const hv = plan.plans.filter((p) => p.role === "h" || p.role === "v");
  return {
    label: options.label,
    frames: analysis.frames,
    storedFrames: plan.storedFrames,
    element: element.name,
    tables: plan.plans.map((p) => ({ name: p.name, type: p.type.name, dims: p.dims, bytes: p.bytes })),
    totalBytes: total,
    baselineBytes: baseline,
    outputs,
    options: opts,
    runtimeSavingBytes: sum(hv),
    notes: plan.notes,
  };
}

/** The ROM budget of exporting a validated effect with the given options (see resolveExportOptions). */
export function exportBudget(effect: Effect, options: ExportOptionsInput = {}): BudgetReport {
  return budgetFromTables(compileShifts(effect), resolveExportOptions(options));
}

/** A budget as plain text for a terminal or README: tables, outputs, options. */
export function budgetText(report: BudgetReport): string {
  const rows: string[][] = [["table", "type", "dimensions", "bytes"]];
  for (const t of report.tables) rows.push([t.name, t.type, t.dims.join(" x "), String(t.bytes)]);
  rows.push(["total", "", "", String(report.totalBytes)]);
  const w = [0, 1, 2, 3].map((i) => Math.max(...rows.map((r) => r[i].length)));
  const table = rows.map((r) => `  ${r[0].padEnd(w[0])}  ${r[1].padEnd(w[1])}  ${r[2].padEnd(w[2])}  ${r[3].padStart(w[3])}`.trimEnd());

  const outRows = [["output", "ROM bytes", "padding", "files"]];
  for (const o of report.outputs)
    outRows.push([o.output, o.romBytes === null ? "-" : String(o.romBytes), String(o.paddingBytes), o.files.join(", ")]);
  const ow = [0, 1, 2].map((i) => Math.max(...outRows.map((r) => r[i].length)));
  const outs = outRows.map((r, i) => {
    const note = i === 0 ? "" : `  (${report.outputs[i - 1].note})`;
    return `  ${r[0].padEnd(ow[0])}  ${r[1].padStart(ow[1])}  ${r[2].padStart(ow[2])}  ${r[3]}${note}`;
  });

  const options = report.options.map((o) => {
    const saving =
      o.savingBytes === null
        ? ""
        : o.savingBytes === 0
          ? "0 bytes; "
          : `${signedBytes(o.savingBytes)}${o.chosen === "off" ? " if on" : ""}; `;
    return `  ${o.option} ${o.chosen}: ${saving}${o.note}`;
  });
  const delta = report.baselineBytes - report.totalBytes;
  return [
    `ROM budget for ${report.label}: ${report.frames} frames (${report.storedFrames} stored), element ${report.element}`,
    "",
    ...table,
    "",
    `without options: ${report.baselineBytes} bytes; the options chosen ${signedBytes(delta, true)}`,
    `run-time routine: computing h and v on the target saves their ${report.runtimeSavingBytes} bytes`,
    "",
    ...outs,
    "",
    "options:",
    ...options,
    ...(report.notes.length ? ["", "notes:", ...report.notes.map((n) => `  ${n}`)] : []),
    "",
  ].join("\n");
}
