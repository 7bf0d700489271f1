import type { ProfileFormValues } from "./form.ts";

/** The settings a blank new profile starts from: a 256 × 224 screen, Q8.8 and core's defaults elsewhere. */
export const BLANK_PROFILE: ProfileFormValues = {
  name: "",
  description: "",
  canvasWidth: 256,
  canvasHeight: 224,
  fixedPointBits: 16,
  fixedPointFraction: 8,
  rounding: "nearest-away",
  halfTurn: "flip",
  edges: "wrap",
  columnGroup: 1,
  dialects: [],
  labelPrefix: "",
  exportOptions: {},
};

/** A stored profile (or starter settings) as the form's values. */
export function profileValues(profile: {
  name: string;
  description: string;
  canvasWidth: number;
  canvasHeight: number;
  fixedPointBits: number;
  fixedPointFraction: number;
  rounding: string;
  halfTurn: string;
  edges: string;
  columnGroup: number;
  dialects: readonly string[];
  labelPrefix: string;
  exportOptions: Record<string, unknown>;
}): ProfileFormValues {
  const x = profile.exportOptions;
  return {
    name: profile.name,
    description: profile.description,
    canvasWidth: profile.canvasWidth,
    canvasHeight: profile.canvasHeight,
    fixedPointBits: profile.fixedPointBits,
    fixedPointFraction: profile.fixedPointFraction,
    rounding: profile.rounding,
    halfTurn: profile.halfTurn,
    edges: profile.edges,
    columnGroup: profile.columnGroup,
    dialects: [...profile.dialects],
    labelPrefix: profile.labelPrefix,
    exportOptions: {
      sign: typeof x.sign === "string" ? x.sign : undefined,
      registerBits: typeof x.registerBits === "number" ? x.registerBits : null,
      element: typeof x.element === "string" ? x.element : undefined,
      split: x.split === true,
      half: x.half === true,
      dedupe: x.dedupe === true,
    },
  };
}
