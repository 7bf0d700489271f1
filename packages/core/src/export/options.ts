import { ExportOptionError } from "./exportOptionError.ts";
import { checkLabel, labelFromName } from "./label.ts";
import { STORAGE_TYPES } from "./storageType.ts";

/** The files an export can make, by output name: C, four assembler dialects, raw binaries, the tables document, the run-time routine. */
export const EXPORT_OUTPUTS = ["c", "6502", "68k", "arm", "z80", "bin", "json", "runtime"] as const;
export type ExportOutput = (typeof EXPORT_OUTPUTS)[number];

/** Sign conventions: "shift" stores shifts as computed (positive moves right/down); "scroll" stores them negated, for scroll registers that move the picture the other way. */
export const SIGNS = ["shift", "scroll"] as const;
export type Sign = (typeof SIGNS)[number];

/** Element type choices: "auto" picks the smallest type that holds the exported values; the others force a type. */
export const ELEMENT_CHOICES = ["auto", ...STORAGE_TYPES] as const;
export type ElementChoice = (typeof ELEMENT_CHOICES)[number];

/** Allowed widths of a scroll register, in bits, for `registerBits`. */
export const REGISTER_BITS = { min: 1, max: 32 } as const;

/** Export options, every one resolved (see resolveExportOptions for the defaults). */
export interface ExportOptions {
  /** Label prefix L of every symbol (`L_h`, `L_v`, …) and of every file name. */
  readonly label: string;
  /** The effect's name, shown in headers; null when unnamed. */
  readonly name: string | null;
  /** Which outputs to make, in EXPORT_OUTPUTS order. */
  readonly outputs: readonly ExportOutput[];
  readonly sign: Sign;
  /** Width in bits of the scroll register the values are wrapped into (unsigned, modulo 2^bits), or null for plain signed values. */
  readonly registerBits: number | null;
  readonly element: ElementChoice;
  /** Store every 16-bit table as a low-byte and a high-byte table (`L_h_lo`, `L_h_hi`). */
  readonly split: boolean;
  /** Store half of every antisymmetric table (h[H−1−r] = −h[r]). */
  readonly half: boolean;
  /** Store identical frames once, with an index table `L_frame`. */
  readonly dedupe: boolean;
}

/** Export options as a caller gives them: everything optional. */
export interface ExportOptionsInput {
  readonly label?: string;
  readonly name?: string | null;
  readonly outputs?: readonly ExportOutput[];
  readonly sign?: Sign;
  readonly registerBits?: number | null;
  readonly element?: ElementChoice;
  readonly split?: boolean;
  readonly half?: boolean;
  readonly dedupe?: boolean;
}

/** Defaults of every export option but the label (which comes from the name). */
export const EXPORT_DEFAULTS = {
  outputs: EXPORT_OUTPUTS,
  sign: "shift",
  registerBits: null,
  element: "auto",
  split: false,
  half: false,
  dedupe: false,
} as const;

const KNOWN = ["label", "name", "outputs", "sign", "registerBits", "element", "split", "half", "dedupe"];

function oneOf<T extends string>(field: string, value: unknown, words: readonly T[]): T {
  if (typeof value === "string" && (words as readonly string[]).includes(value)) return value as T;
  throw new ExportOptionError(field, value, `one of ${words.map((w) => `"${w}"`).join(", ")}`);
}

function flag(field: string, value: unknown): boolean {
  if (typeof value === "boolean") return value;
  throw new ExportOptionError(field, value, "true or false");
}

/** Validates export options and fills in the defaults; throws ExportOptionError naming the option, the value and the allowed form. */
export function resolveExportOptions(input: ExportOptionsInput = {}): ExportOptions {
  if (typeof input !== "object" || input === null) throw new ExportOptionError("options", input, "an object");
  for (const key of Object.keys(input))
    if (!KNOWN.includes(key))
      throw new ExportOptionError(key, (input as Record<string, unknown>)[key], `only the options ${KNOWN.join(", ")}`, "unknown option");

  const name = input.name ?? null;
  if (name !== null && typeof name !== "string") throw new ExportOptionError("name", name, "a string or null");
  const label = input.label !== undefined ? checkLabel(input.label) : labelFromName(name ?? "effect");

  let outputs: readonly ExportOutput[] = EXPORT_DEFAULTS.outputs;
  if (input.outputs !== undefined) {
    if (!Array.isArray(input.outputs) || input.outputs.length === 0)
      throw new ExportOptionError("outputs", input.outputs, `a non-empty list of ${EXPORT_OUTPUTS.join(", ")}`);
    const chosen = new Set(input.outputs.map((o) => oneOf("outputs", o, EXPORT_OUTPUTS)));
    outputs = EXPORT_OUTPUTS.filter((o) => chosen.has(o));
  }

  const registerBits = input.registerBits ?? null;
  if (registerBits !== null && !(Number.isInteger(registerBits) && registerBits >= REGISTER_BITS.min && registerBits <= REGISTER_BITS.max))
    throw new ExportOptionError("registerBits", registerBits, `a whole number from ${REGISTER_BITS.min} to ${REGISTER_BITS.max}, or none`);

  return {
    label,
    name,
    outputs,
    sign: input.sign === undefined ? EXPORT_DEFAULTS.sign : oneOf("sign", input.sign, SIGNS),
    registerBits,
    element: input.element === undefined ? EXPORT_DEFAULTS.element : oneOf("element", input.element, ELEMENT_CHOICES),
    split: input.split === undefined ? false : flag("split", input.split),
    half: input.half === undefined ? false : flag("half", input.half),
    dedupe: input.dedupe === undefined ? false : flag("dedupe", input.dedupe),
  };
}
