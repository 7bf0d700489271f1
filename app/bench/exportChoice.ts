/**
 * The export panel's choices: defaults from the effect's target profile (its dialects and label prefix), core's
 * options made from them, and the address of the zip the server builds with the same options.
 */
import {
  checkLabel,
  ELEMENT_CHOICES,
  EXPORT_OUTPUTS,
  ExportOptionError,
  labelFromName,
  resolveExportOptions,
  SIGNS,
  type ElementChoice,
  type ExportOptionsInput,
  type ExportOutput,
  type Sign,
} from "@skewsmith/core";

/** The export options as the panel holds them. */
export interface ExportChoice {
  outputs: ExportOutput[];
  label: string;
  sign: Sign;
  /** Scroll register width in bits, or "" for plain signed values. */
  registerBits: string;
  element: ElementChoice;
  split: boolean;
  half: boolean;
  dedupe: boolean;
}

/** What each output makes, in plain words. */
export const OUTPUT_LABELS: Record<ExportOutput, string> = {
  c: "C99 header and source",
  "6502": "6502 / 65816 assembler (ca65)",
  "68k": "68000 assembler (GNU as)",
  arm: "ARM assembler (GNU as)",
  z80: "Z80 / SM83 assembler",
  bin: "Raw binary tables (little- and big-endian)",
  json: "Tables document (JSON)",
  runtime: "Run-time routine in C",
};

/** Dialect names a target profile may list, and the output each stands for. */
const DIALECT_OUTPUT: Record<string, ExportOutput> = {
  c: "c",
  c99: "c",
  "6502": "6502",
  ca65: "6502",
  "65816": "6502",
  "68k": "68k",
  m68k: "68k",
  "68000": "68k",
  arm: "arm",
  gba: "arm",
  z80: "z80",
  sm83: "z80",
  bin: "bin",
  binary: "bin",
  json: "json",
  runtime: "runtime",
};

/** The target profile's part in the defaults. */
export interface ProfileExport {
  dialects: string[];
  labelPrefix: string;
  exportOptions: Record<string, unknown>;
}

function validLabel(label: string): string | null {
  try {
    return checkLabel(label);
  } catch {
    return null;
  }
}

/**
 * The defaults: the profile's dialects (every output when it lists none) and its label prefix (a prefix such as
 * "rose_" gives the label "rose", whose tables are rose_h, rose_v, …), then the profile's own export options where
 * core accepts them; without a profile, the label made from the effect's name.
 */
export function exportDefaults(profile: ProfileExport | null, effectName: string): ExportChoice {
  const outputs = [...new Set((profile?.dialects ?? []).map((d) => DIALECT_OUTPUT[d.trim().toLowerCase()]).filter(Boolean))];
  const prefix = validLabel((profile?.labelPrefix ?? "").replace(/_+$/, ""));
  const choice: ExportChoice = {
    outputs: outputs.length > 0 ? EXPORT_OUTPUTS.filter((o) => outputs.includes(o)) : [...EXPORT_OUTPUTS],
    label: prefix ?? labelFromName(effectName),
    sign: "shift",
    registerBits: "",
    element: "auto",
    split: false,
    half: false,
    dedupe: false,
  };
  const extra = profile?.exportOptions ?? {};
  try {
    const resolved = resolveExportOptions({ ...(extra as ExportOptionsInput), label: choice.label, outputs: choice.outputs });
    return {
      ...choice,
      outputs: [...resolved.outputs],
      sign: resolved.sign,
      registerBits: resolved.registerBits === null ? "" : String(resolved.registerBits),
      element: resolved.element,
      split: resolved.split,
      half: resolved.half,
      dedupe: resolved.dedupe,
    };
  } catch {
    return choice;
  }
}

/** Core's export options for a choice, or the message of the first bad one (core's words, naming the option). */
export function exportInput(
  choice: ExportChoice,
  name: string,
): { ok: true; options: ExportOptionsInput } | { ok: false; field: string; message: string } {
  const registerBits = choice.registerBits.trim() === "" ? null : Number(choice.registerBits);
  const options: ExportOptionsInput = {
    name,
    label: choice.label.trim(),
    outputs: choice.outputs,
    sign: choice.sign,
    registerBits: Number.isNaN(registerBits) ? (choice.registerBits as unknown as number) : registerBits,
    element: choice.element,
    split: choice.split,
    half: choice.half,
    dedupe: choice.dedupe,
  };
  try {
    resolveExportOptions(options);
    return { ok: true, options };
  } catch (error) {
    const message = error instanceof Error ? error.message : String(error);
    const field = error instanceof ExportOptionError ? error.field : "form";
    return { ok: false, field, message };
  }
}

/** The zip's address: the server builds the bundle of the saved effect with these options (the same names as core's). */
export function exportZipHref(effectId: string, choice: ExportChoice): string {
  const q = new URLSearchParams();
  q.set("outputs", choice.outputs.join(","));
  q.set("label", choice.label.trim());
  q.set("sign", choice.sign);
  if (choice.registerBits.trim() !== "") q.set("registerBits", choice.registerBits.trim());
  q.set("element", choice.element);
  q.set("split", String(choice.split));
  q.set("half", String(choice.half));
  q.set("dedupe", String(choice.dedupe));
  return `/effects/${effectId}/export.zip?${q.toString()}`;
}

export { ELEMENT_CHOICES, EXPORT_OUTPUTS, SIGNS };
