/**
 * The export panel's choices: defaults from the effect's target profile (its dialects and label prefix), core's
 * options made from them, and the address of the zip the server builds with the same options.
 */
import {
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

/**
 * The panel's choices for export defaults (app/exports/defaults.ts: the profile's dialects, label prefix and stored
 * options), resolved by core; the label falls back to one made from the effect's name.
 */
export function exportChoiceFrom(defaults: ExportOptionsInput, effectName: string): ExportChoice {
  const resolved = resolveExportOptions({ ...defaults, name: effectName, label: defaults.label ?? labelFromName(effectName) });
  return {
    outputs: [...resolved.outputs],
    label: resolved.label,
    sign: resolved.sign,
    registerBits: resolved.registerBits === null ? "" : String(resolved.registerBits),
    element: resolved.element,
    split: resolved.split,
    half: resolved.half,
    dedupe: resolved.dedupe,
  };
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
export { OUTPUT_LABELS } from "../profiles/form.ts";
