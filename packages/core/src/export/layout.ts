import { compileShifts, type CompiledTables, type FrameTables } from "../compileTables.ts";
import type { Effect } from "../effect.ts";
import { analyseExport, exportedValue, type ExportAnalysis } from "./analysis.ts";
import { ExportOptionError } from "./exportOptionError.ts";
import { resolveExportOptions, type ExportOptions, type ExportOptionsInput } from "./options.ts";
import { smallestStorage, STORAGE, STORAGE_TYPES, twosComplement, type StorageType } from "./storageType.ts";

/** What a table holds: row shifts, column shifts, half-turn flips, the two coefficients, or the frame index of a deduplicated export. */
export type TableRole = "h" | "v" | "flip" | "alpha" | "beta" | "frame";
/** A whole table, or the low or high bytes of a split 16-bit table. */
export type TablePart = "whole" | "lo" | "hi";

/** The shape of one exported table: symbol, element type and dimensions, without its values. */
export interface TablePlan {
  /** The symbol, e.g. `L_h` or `L_h_lo`. */
  readonly name: string;
  readonly role: TableRole;
  readonly part: TablePart;
  readonly type: StorageType;
  /** Dimensions, outer first: [frames, entries] or [frames]. */
  readonly dims: readonly number[];
  /** The constant naming each dimension, for C declarations. */
  readonly dimNames: readonly string[];
  /** Entries in all. */
  readonly count: number;
  /** Size in bytes, without alignment padding. */
  readonly bytes: number;
  /** One line saying what the table holds, its units and layout. */
  readonly description: string;
}

/** One exported table with its values, flattened row-major, every one within the table's type. */
export interface LayoutTable extends TablePlan {
  readonly values: readonly number[];
  /**
   * The per-frame tables ([frame][entry]) row by row, one row per stored frame, or null for the one-dimensional tables.
   * Frames whose compiled tables are shared (compileShifts shares one per coefficient) share one row array here too, so
   * that the printers format each distinct row once: a 4096-frame track has only a few hundred distinct rows.
   */
  readonly rows: readonly (readonly number[])[] | null;
}

/** A layout table whose flat `values` are made from its rows only when something reads them. */
function layoutTable(plan: TablePlan, rows: readonly (readonly number[])[] | null, flat: readonly number[] | null): LayoutTable {
  let values = flat;
  const table = { ...plan, rows } as Omit<LayoutTable, "values">;
  return Object.defineProperty(table, "values", { enumerable: true, get: () => (values ??= rows!.flat()) }) as LayoutTable;
}

/** `f(x)` computed once per distinct `x` (by identity). */
function memo<K extends object, V>(f: (x: K) => V): (x: K) => V {
  const seen = new Map<K, V>();
  return (x) => {
    let v = seen.get(x);
    if (v === undefined) {
      v = f(x);
      seen.set(x, v);
    }
    return v;
  };
}

/** A named constant every output defines (`L_FRAMES`, …). */
export interface LayoutConstant {
  readonly name: string;
  readonly value: number;
  readonly description: string;
}

/** The data of one export, independent of any output format: every dialect, the C file and the binaries print this. */
export interface ExportLayout {
  readonly label: string;
  readonly options: ExportOptions;
  readonly effect: Effect;
  readonly analysis: ExportAnalysis;
  readonly frames: number;
  /** Frames actually stored: fewer than `frames` when dedupe shares identical frames. */
  readonly storedFrames: number;
  readonly width: number;
  readonly height: number;
  /** Type of the h and v tables. */
  readonly element: StorageType;
  /** Type of the alpha and beta tables: signed, `bits` wide. */
  readonly coefficient: StorageType;
  /** Whether only half of h (of v) is stored, and how many entries per frame are. */
  readonly halfH: boolean;
  readonly halfV: boolean;
  readonly hEntries: number;
  readonly vEntries: number;
  /** Roles whose 16-bit tables are stored as low and high bytes. */
  readonly splitRoles: readonly TableRole[];
  readonly constants: readonly LayoutConstant[];
  readonly tables: readonly LayoutTable[];
  /** One comment per stored frame: which frames it holds, their angle and flip. */
  readonly frameNotes: readonly string[];
  /** Things a developer must know about this layout (half tables, options not applied, large tables). */
  readonly notes: readonly string[];
}

/** Largest table a 6502/65816 or Z80 can reach without bank switching, in bytes (a 16-bit address space; common practice). */
export const BANK_BYTES = 65536;

/**
 * The storage type of the h and v tables: "auto" is the smallest signed type holding the exported values (the spec's
 * element type, recomputed after negation) or, with a register width N, the smallest unsigned type of at least N bits;
 * a forced type must hold every exported value, else ExportOptionError names `element` and the types that would.
 */
export function resolveElement(analysis: ExportAnalysis, options: ExportOptions): StorageType {
  const { registerBits, element, sign } = options;
  const { min, max } = analysis;
  if (element === "auto") {
    const t = registerBits !== null ? smallestStorage(0, 2 ** registerBits - 1, true) : smallestStorage(min, max, false);
    if (t) return t;
    throw new ExportOptionError(
      "sign",
      sign,
      '"shift" for this effect',
      `the negated shifts run from ${min} to ${max}, which no type up to int32 holds`,
    );
  }
  const t = STORAGE[element];
  if (min >= t.min && max <= t.max) return t;
  const fitting = STORAGE_TYPES.filter((n) => min >= STORAGE[n].min && max <= STORAGE[n].max);
  throw new ExportOptionError(
    "element",
    element,
    `"auto"${fitting.length ? ` or ${fitting.map((n) => `"${n}"`).join(", ")}` : ""}`,
    `the exported values run from ${min} to ${max}; ${element} holds ${t.min} to ${t.max}`,
  );
}

/** What planTables needs: the analysis, options and the resolved element type. */
interface PlanInput {
  readonly analysis: ExportAnalysis;
  readonly effect: Effect;
  readonly options: ExportOptions;
  readonly element: StorageType;
}

/** The shape of every table and constant for the chosen options, without values; throws ExportOptionError when half or split cannot apply at all. */
export function planLayout({ analysis, effect, options, element }: PlanInput) {
  const L = options.label;
  const { frames, width, height } = analysis;
  const notes: string[] = [];
  const storedFrames = options.dedupe ? analysis.storedFrames.length : frames;

  let halfH = false;
  let halfV = false;
  if (options.half) {
    halfH = analysis.halfH.available;
    halfV = analysis.halfV.available;
    if (!halfH && !halfV)
      throw new ExportOptionError("half", true, "false for this effect", `${analysis.halfH.reason}; ${analysis.halfV.reason}`);
    if (!halfH) notes.push(`h is stored whole: ${analysis.halfH.reason}.`);
    if (!halfV) notes.push(`v is stored whole: ${analysis.halfV.reason}.`);
  }
  const hEntries = halfH ? Math.ceil(height / 2) : height;
  const vEntries = halfV ? Math.ceil(width / 2) : width;

  const coefficient = STORAGE[`int${effect.fixedPoint.bits}` as "int8" | "int16" | "int32"];
  const index = options.dedupe ? (storedFrames <= 256 ? STORAGE.uint8 : STORAGE.uint16) : null;

  const constants: LayoutConstant[] = [
    { name: `${L}_FRAMES`, value: frames, description: "frames in the angle track" },
    { name: `${L}_WIDTH`, value: width, description: "canvas width in pixels: entries of a whole v table" },
    { name: `${L}_HEIGHT`, value: height, description: "canvas height in pixels: entries of a whole h table" },
    {
      name: `${L}_FRACTION`,
      value: effect.fixedPoint.fraction,
      description: `fraction bits of alpha and beta (${effect.fixedPoint.bits}-bit signed)`,
    },
  ];
  if (options.dedupe)
    constants.push({ name: `${L}_STORED_FRAMES`, value: storedFrames, description: "frames stored after identical frames were shared" });
  const mod = options.registerBits !== null ? ` mod 2^${options.registerBits}` : "";
  if (halfH)
    constants.push({
      name: `${L}_H_ENTRIES`,
      value: hEntries,
      description: `rows stored per frame; row r >= ${hEntries} is -h[HEIGHT-1-r]${mod}`,
    });
  if (halfV)
    constants.push({
      name: `${L}_V_ENTRIES`,
      value: vEntries,
      description: `columns stored per frame; column c >= ${vEntries} is -v[WIDTH-1-c]${mod}`,
    });
  const framesDim = options.dedupe ? `${L}_STORED_FRAMES` : `${L}_FRAMES`;

  const what = options.sign === "scroll" ? "scroll values (negated shifts)" : "shifts";
  const wrapWord = options.registerBits !== null ? `, wrapped modulo 2^${options.registerBits}` : "";
  const byFrame = options.dedupe ? `stored frame (${L}_frame[i])` : "frame";
  const [right, down] = options.sign === "scroll" ? ["left", "up"] : ["right", "down"];
  const base: Omit<TablePlan, "name" | "part" | "count" | "bytes">[] = [
    {
      role: "h",
      type: element,
      dims: [storedFrames, hEntries],
      dimNames: [framesDim, halfH ? `${L}_H_ENTRIES` : `${L}_HEIGHT`],
      description: `row ${what} in whole pixels${wrapWord}, [${byFrame}][row]${halfH ? `, rows 0 to ${hEntries - 1} only` : ""}; +1 moves a row ${right}`,
    },
    {
      role: "v",
      type: element,
      dims: [storedFrames, vEntries],
      dimNames: [framesDim, halfV ? `${L}_V_ENTRIES` : `${L}_WIDTH`],
      description: `column ${what} in whole pixels${wrapWord}, [${byFrame}][column]${halfV ? `, columns 0 to ${vEntries - 1} only` : ""}; +1 moves a column ${down}`,
    },
    {
      role: "flip",
      type: STORAGE.uint8,
      dims: [storedFrames],
      dimNames: [framesDim],
      description: `half-turn flip per ${byFrame}: 1 = mirror both axes first, 0 = none`,
    },
    {
      role: "alpha",
      type: coefficient,
      dims: [storedFrames],
      dimNames: [framesDim],
      description: `k-alpha per ${byFrame}: -tan(residual/2) scaled by 2^${effect.fixedPoint.fraction}, signed ${effect.fixedPoint.bits}-bit`,
    },
    {
      role: "beta",
      type: coefficient,
      dims: [storedFrames],
      dimNames: [framesDim],
      description: `k-beta per ${byFrame}: sin(residual) scaled by 2^${effect.fixedPoint.fraction}, signed ${effect.fixedPoint.bits}-bit`,
    },
  ];
  if (index)
    base.push({
      role: "frame",
      type: index,
      dims: [frames],
      dimNames: [`${L}_FRAMES`],
      description: "stored frame of every frame i: index the other tables with it",
    });

  const splitRoles: TableRole[] = [];
  if (options.split) {
    for (const b of base) if (b.type.bytes === 2) splitRoles.push(b.role);
    if (splitRoles.length === 0)
      throw new ExportOptionError(
        "split",
        true,
        "false for this effect",
        `no table holds 16-bit values (h and v are ${element.name}, alpha and beta ${coefficient.name}${index ? `, frame ${index.name}` : ""})`,
      );
    const whole32 = base.filter((b) => b.type.bytes === 4).map((b) => `${L}_${b.role}`);
    if (whole32.length) notes.push(`split applies to 16-bit tables only; ${whole32.join(", ")} stay 32-bit.`);
  }

  const plans: TablePlan[] = [];
  for (const b of base) {
    const count = b.dims.reduce((a, d) => a * d, 1);
    if (splitRoles.includes(b.role)) {
      for (const part of ["lo", "hi"] as const)
        plans.push({
          ...b,
          name: `${L}_${b.role}_${part}`,
          part,
          type: STORAGE.uint8,
          count,
          bytes: count,
          description: `${part === "lo" ? "low" : "high"} bytes of ${b.type.name} ${b.description}`,
        });
    } else plans.push({ ...b, name: `${L}_${b.role}`, part: "whole", count, bytes: count * b.type.bytes });
  }
  for (const p of plans)
    if (p.bytes > BANK_BYTES)
      notes.push(`${p.name} takes ${p.bytes} bytes, more than the ${BANK_BYTES}-byte address space of a 6502/65816 bank or a Z80.`);

  return { storedFrames, halfH, halfV, hEntries, vEntries, coefficient, splitRoles, constants, plans, notes };
}

function degreesText(d: number): string {
  return `${Number(d.toFixed(4))} deg`;
}

/** Lays out every table of an effect's compiled frames under resolved options: the model every output prints. */
export function layoutFromTables(tables: CompiledTables<FrameTables>, options: ExportOptions): ExportLayout {
  const analysis = analyseExport(tables, options.sign, options.registerBits);
  const effect = tables.effect;
  const element = resolveElement(analysis, options);
  const plan = planLayout({ analysis, effect, options, element });
  const stored = options.dedupe ? analysis.storedFrames : tables.frames.map((f) => [f.index]);
  const frameOf = stored.map((held) => tables.frames[held[0]]);
  const value = (s: number) => exportedValue(s, options.sign, options.registerBits);

  // A plain loop, not Array.from with a map function: that walks the table through the iterator protocol.
  const row = (t: Int32Array, n: number): number[] => {
    const out: number[] = [];
    for (let i = 0; i < n; i++) out.push(value(t[i]));
    return out;
  };
  const hRow = memo((t: Int32Array) => row(t, Math.min(t.length, plan.hEntries)));
  const vRow = memo((t: Int32Array) => row(t, Math.min(t.length, plan.vEntries)));
  // Split tables: the low and high byte of each 16-bit two's complement value.
  const lo = memo((row: readonly number[]) => row.map((x) => twosComplement(x, 2) & 0xff));
  const hi = memo((row: readonly number[]) => row.map((x) => twosComplement(x, 2) >> 8));
  const wholeValues = (role: TableRole): number[] => {
    switch (role) {
      case "flip":
        return frameOf.map((f) => (f.flip ? 1 : 0));
      case "alpha":
        return frameOf.map((f) => f.alpha);
      case "beta":
        return frameOf.map((f) => f.beta);
      default:
        return [...analysis.frameIndex];
    }
  };
  const tablesOut: LayoutTable[] = plan.plans.map((p) => {
    if (p.role === "h" || p.role === "v") {
      const whole = frameOf.map((f) => (p.role === "h" ? hRow(f.h) : vRow(f.v)));
      return layoutTable(p, p.part === "whole" ? whole : whole.map(p.part === "lo" ? lo : hi), null);
    }
    const whole = wholeValues(p.role);
    return layoutTable(
      p,
      null,
      p.part === "whole" ? whole : whole.map((x) => (p.part === "lo" ? twosComplement(x, 2) & 0xff : twosComplement(x, 2) >> 8)),
    );
  });

  const frameNotes = stored.map((held) => {
    const f = tables.frames[held[0]];
    const which =
      held.length === 1
        ? `frame ${held[0]}`
        : `frames ${held.slice(0, 8).join(", ")}${held.length > 8 ? `, ... (${held.length} in all)` : ""}`;
    return `${which}: ${degreesText(f.degrees)}${f.flip ? `, flip + ${degreesText(f.residualDegrees)}` : ""}${f.saturated ? ", saturated" : ""}`;
  });

  return {
    label: options.label,
    options,
    effect,
    analysis,
    frames: analysis.frames,
    storedFrames: plan.storedFrames,
    width: analysis.width,
    height: analysis.height,
    element,
    coefficient: plan.coefficient,
    halfH: plan.halfH,
    halfV: plan.halfV,
    hEntries: plan.hEntries,
    vEntries: plan.vEntries,
    splitRoles: plan.splitRoles,
    constants: plan.constants,
    tables: tablesOut,
    frameNotes,
    notes: plan.notes,
  };
}

/** Compiles a validated effect and lays out its export tables under the given options (see resolveExportOptions). */
export function exportLayout(effect: Effect, options: ExportOptionsInput = {}): ExportLayout {
  return layoutFromTables(compileShifts(effect), resolveExportOptions(options));
}

/** Where one table sits in a raw binary or an aligned section: byte offset from the start and the zero padding before it. */
export interface TablePlacement {
  readonly table: TablePlan;
  readonly offset: number;
  readonly padding: number;
}

/** Places tables one after another; with `aligned`, each starts at a multiple of its element size (2 or 4 bytes), zero padding between. */
export function placeTables<T extends TablePlan>(
  tables: readonly T[],
  aligned: boolean,
): { placements: (TablePlacement & { table: T })[]; bytes: number; padding: number } {
  let at = 0;
  let padding = 0;
  const placements = tables.map((table) => {
    const pad = aligned ? (table.type.bytes - (at % table.type.bytes)) % table.type.bytes : 0;
    padding += pad;
    at += pad;
    const placement = { table, offset: at, padding: pad };
    at += table.bytes;
    return placement;
  });
  return { placements, bytes: at, padding };
}
