/**
 * The export options an effect exports with by default, from its target profile: the profile's dialects choose
 * the outputs, its label prefix goes in front of the effect's own label, and its further options (sign, register
 * width, element type, split, half, dedupe) are passed on. Options a caller gives (a query, the export panel)
 * go on top: `resolveExportOptions({ ...exportDefaultsForProfile(profile, name), ...chosen })`.
 */
import {
  checkLabel,
  EXPORT_OUTPUTS,
  LABEL_MAX_LENGTH,
  labelFromName,
  resolveExportOptions,
  type ExportOptionsInput,
} from "@skewsmith/core";
import type { ProfileExportSettings } from "../profiles/apply.ts";

/**
 * The label of an effect under a profile's label prefix: `prefix_ownlabel`, so that effects of one profile keep
 * distinct symbols. Longer than core allows (LABEL_MAX_LENGTH), it loses whole words from the end (a word cut in
 * two only when no whole word fits). The effect's own label (core's labelFromName) when there is no prefix, and the
 * prefix alone if the joined label is not one core accepts.
 */
export function profileLabel(prefix: string, effectName: string): string {
  const own = labelFromName(effectName);
  if (!prefix) return own;
  let joined = `${prefix}_${own}`;
  if (joined.length > LABEL_MAX_LENGTH) {
    const cut = joined.slice(0, LABEL_MAX_LENGTH);
    const wordEnd = joined[LABEL_MAX_LENGTH] === "_" ? LABEL_MAX_LENGTH : cut.lastIndexOf("_");
    joined = wordEnd > prefix.length ? cut.slice(0, wordEnd) : cut;
  }
  joined = joined.replace(/_+$/, "");
  try {
    return checkLabel(joined);
  } catch {
    return checkLabel(prefix);
  }
}

/**
 * Core export options (ExportOptionsInput) for an effect named `effectName` under `profile` (null: no profile,
 * core's own defaults with the label made from the name). Stored options that core no longer accepts are left
 * out rather than breaking the export, so the result always passes resolveExportOptions.
 */
export function exportDefaultsForProfile(profile: ProfileExportSettings | null, effectName: string): ExportOptionsInput {
  const base: ExportOptionsInput = { name: effectName, label: labelFromName(effectName) };
  if (!profile) return base;
  let label = base.label;
  try {
    label = profileLabel(profile.labelPrefix, effectName);
  } catch {
    // A prefix stored before core's label rules: keep the effect's own label.
  }
  const outputs = EXPORT_OUTPUTS.filter((o) => profile.dialects.includes(o));
  const options: ExportOptionsInput = { ...base, label, ...(outputs.length ? { outputs } : {}) };
  const extra: Record<string, unknown> = {};
  for (const key of ["sign", "registerBits", "element", "split", "half", "dedupe"] as const) {
    if (!Object.hasOwn(profile.exportOptions, key)) continue;
    const candidate = { ...options, [key]: profile.exportOptions[key] };
    try {
      resolveExportOptions(candidate as ExportOptionsInput);
      extra[key] = profile.exportOptions[key];
    } catch {
      // Refused by core: fall back to core's default for this option.
    }
  }
  return { ...options, ...extra } as ExportOptionsInput;
}
