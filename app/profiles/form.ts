/**
 * The target profile form: field names, the words shown for each export output, and turning a submitted form
 * into the input that app/effects/settings.ts (targetProfileInput) checks. No runtime imports of core or zod,
 * so the pages that show the form stay light in the browser.
 */
import { formShapeErrors, notText } from "../formShape.ts";

/** What each export output makes, in the words of the form (core's output names are the values). */
export const OUTPUT_LABELS: Readonly<Record<string, string>> = {
  c: "C99 header and source",
  "6502": "6502 / 65816 assembler (ca65)",
  "68k": "68000 assembler (GNU as)",
  arm: "ARM assembler (GNU as)",
  z80: "Z80 / SM83 assembler (GNU as)",
  bin: "Raw binary tables",
  json: "Tables document (JSON)",
  runtime: "Run-time routine (C)",
};

/** A profile's values as the form shows them (and as a failed submission sends them back). */
export interface ProfileFormValues {
  name: string;
  description: string;
  canvasWidth: number | string;
  canvasHeight: number | string;
  fixedPointBits: number | string;
  fixedPointFraction: number | string;
  rounding: string;
  halfTurn: string;
  edges: string;
  columnGroup: number | string;
  dialects: string[];
  labelPrefix: string;
  /** Most colours a sprite may use on the target; "" for no limit. */
  maxColours: number | string;
  exportOptions: {
    sign?: string;
    registerBits?: number | string | null;
    element?: string;
    split?: boolean;
    half?: boolean;
    dedupe?: boolean;
  };
}

const text = (form: FormData, name: string): string => {
  const value = form.get(name);
  return typeof value === "string" ? value : "";
};

/** The single-valued fields of the form. */
const FIELDS = [
  "name",
  "description",
  "canvasWidth",
  "canvasHeight",
  "fixedPointBits",
  "fixedPointFraction",
  "rounding",
  "halfTurn",
  "edges",
  "columnGroup",
  "labelPrefix",
  "maxColours",
] as const;

/** Fields of the form that take one value (the dialect checkboxes take a list). */
const SINGLE = [...FIELDS, "sign", "registerBits", "element", "split", "half", "dedupe", "version"] as const;

/**
 * What is wrong with the form's shape before its values are read: a single-valued field sent twice, or a file
 * where text belongs (the same rule as parseForm in app/forms.ts). Empty when the shape is right.
 */
export function profileFormShapeErrors(form: FormData): Record<string, string> {
  const errors = formShapeErrors(form, SINGLE);
  if (form.getAll("dialects").some((v) => typeof v !== "string")) errors.dialects = notText("dialects");
  return errors;
}

/**
 * The submitted profile form as the input of targetProfileInput: checkboxes become lists and booleans, an empty
 * register width means none, a register width that is not a whole number stays as typed (so the check names it).
 */
export function profileFormValues(form: FormData): ProfileFormValues {
  const values = Object.fromEntries(FIELDS.map((f) => [f, text(form, f)])) as Record<(typeof FIELDS)[number], string>;
  const registerText = text(form, "registerBits").trim();
  const register = registerText === "" ? null : /^\d{1,3}$/.test(registerText) ? Number(registerText) : registerText;
  return {
    ...values,
    dialects: form.getAll("dialects").filter((v): v is string => typeof v === "string"),
    exportOptions: {
      sign: text(form, "sign") || undefined,
      registerBits: register,
      element: text(form, "element") || undefined,
      split: form.get("split") === "on",
      half: form.get("half") === "on",
      dedupe: form.get("dedupe") === "on",
    },
  };
}

/** The choices the form offers, read from core by the loader (so core stays out of the browser bundle). */
export interface ProfileFormOptions {
  bits: number[];
  roundings: string[];
  halfTurns: string[];
  edges: string[];
  outputs: string[];
  signs: string[];
  elements: string[];
  registerBits: { min: number; max: number };
  canvas: { min: number; max: number };
  labelPrefixMax: number;
  colours: { min: number; max: number };
}
