import type { ProfileSettings } from "../effects/settings.ts";
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
  maxColours: "",
  exportOptions: {},
};

/** A stored profile (or starter settings) as the form's values. */
export function profileValues(
  profile: ProfileSettings & {
    name: string;
    description: string;
    dialects: readonly string[];
    labelPrefix: string;
    maxColours?: number | null;
    exportOptions: Record<string, unknown>;
  },
): ProfileFormValues {
  const x = profile.exportOptions;
  const { name, description, canvasWidth, canvasHeight, fixedPointBits, fixedPointFraction, rounding, halfTurn, edges, columnGroup } =
    profile;
  return {
    ...{ name, description, canvasWidth, canvasHeight, fixedPointBits, fixedPointFraction, rounding, halfTurn, edges, columnGroup },
    dialects: [...profile.dialects],
    labelPrefix: profile.labelPrefix,
    maxColours: profile.maxColours ?? "",
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
