import type { ReactNode } from "react";
import { Form } from "react-router";
import { DESCRIPTION_MAX, NAME_MAX, type FieldErrors } from "../../forms.ts";
import { OUTPUT_LABELS, type ProfileFormOptions, type ProfileFormValues } from "../../profiles/form.ts";
import { Button, Field, FormError, Select, TextArea, TextInput } from "../ui.tsx";

function Section({ title, hint, children }: { title: string; hint?: ReactNode; children: ReactNode }) {
  return (
    <fieldset className="flex flex-col gap-3 border-t border-ink-800 pt-4 first:border-0 first:pt-0">
      <legend className="mb-1 text-sm font-semibold text-ink-100">{title}</legend>
      {hint ? <p className="-mt-2 text-xs text-ink-400">{hint}</p> : null}
      {children}
    </fieldset>
  );
}

/**
 * The target profile form (new, edit, or read-only for viewers): name, canvas and arithmetic, export dialects,
 * label prefix and export options. Posts `intent` to the current route; field messages sit next to the fields.
 */
export function ProfileForm({
  values,
  options,
  errors,
  intent,
  submit,
  readOnly = false,
  hidden = {},
  aside,
}: {
  values: ProfileFormValues;
  options: ProfileFormOptions;
  errors?: FieldErrors;
  intent: string;
  submit: string;
  readOnly?: boolean;
  hidden?: Record<string, string | number>;
  /** Shown beside the submit button (say, what saving does to following effects). */
  aside?: ReactNode;
}) {
  const e = errors ?? {};
  const number = (name: keyof ProfileFormValues, label: string, min: number, max: number, hint?: string) => (
    <Field label={label} name={`profile-${name}`} error={e[name]} hint={hint}>
      <TextInput
        id={`profile-${name}`}
        name={name}
        type="number"
        inputMode="numeric"
        min={min}
        max={max}
        defaultValue={String(values[name])}
        required
        error={e[name]}
        className="num"
      />
    </Field>
  );
  const choice = (name: string, label: string, list: readonly (string | number)[], value: string | number, hint?: string) => (
    <Field label={label} name={`profile-${name}`} error={e[name]} hint={hint}>
      <Select id={`profile-${name}`} name={name} defaultValue={String(value)} error={e[name]}>
        {list.map((v) => (
          <option key={v} value={v}>
            {v}
          </option>
        ))}
      </Select>
    </Field>
  );
  const flag = (name: "split" | "half" | "dedupe", label: string, hint: string) => (
    <label className="flex items-start gap-2 text-sm text-ink-200">
      <input type="checkbox" name={name} defaultChecked={values.exportOptions[name] ?? false} className="mt-1 accent-glass-400" />
      <span>
        {label}
        <span className="block text-xs text-ink-400">{hint}</span>
      </span>
    </label>
  );
  const x = values.exportOptions;
  return (
    <Form method="post" className="flex flex-col gap-5" aria-label="Target profile" preventScrollReset>
      {Object.entries(hidden).map(([name, value]) => (
        <input key={name} type="hidden" name={name} value={value} />
      ))}
      <fieldset disabled={readOnly} className="flex flex-col gap-5 disabled:opacity-75">
        <Section title="Name">
          <div className="grid gap-3 md:grid-cols-[2fr_3fr]">
            <Field label="Profile name" name="profile-name" error={e.name}>
              <TextInput
                id="profile-name"
                name="name"
                maxLength={NAME_MAX}
                required
                defaultValue={values.name}
                placeholder="Say, 256 × 224 storm level"
                error={e.name}
              />
            </Field>
            <Field label="Description" name="profile-description" error={e.description}>
              <TextArea
                id="profile-description"
                name="description"
                rows={2}
                maxLength={DESCRIPTION_MAX}
                defaultValue={values.description}
                placeholder="Which target, mode and screen it is for"
                error={e.description}
              />
            </Field>
          </div>
        </Section>

        <Section
          title="Canvas and arithmetic"
          hint="These settings flow into every effect that follows the profile; detached effects keep their own."
        >
          <div className="grid grid-cols-2 gap-3 md:grid-cols-4">
            {number("canvasWidth", "Canvas width", options.canvas.min, options.canvas.max, "pixels")}
            {number("canvasHeight", "Canvas height", options.canvas.min, options.canvas.max, "pixels")}
            {choice("fixedPointBits", "Bits", options.bits, values.fixedPointBits, "coefficient word")}
            {number("fixedPointFraction", "Fraction bits", 0, 31, "below the bits")}
            {choice("rounding", "Rounding", options.roundings, values.rounding)}
            {choice("halfTurn", "Half-turn", options.halfTurns, values.halfTurn, "flip uses mirror bits")}
            {choice("edges", "Edges", options.edges, values.edges)}
            {number("columnGroup", "Column group", 1, options.canvas.max, "pixels per scrolled column")}
          </div>
        </Section>

        <Section
          title="Sprites"
          hint="What the target can show of a sprite: a sprite with more colours is refused for effects using this profile."
        >
          <div className="grid grid-cols-2 gap-3 md:grid-cols-4">
            <Field
              label="Colour limit"
              name="profile-maxColours"
              error={e.maxColours}
              hint={`colours per sprite, background included, ${options.colours.min}–${options.colours.max}; empty for none`}
            >
              <TextInput
                id="profile-maxColours"
                name="maxColours"
                type="number"
                inputMode="numeric"
                min={options.colours.min}
                max={options.colours.max}
                defaultValue={String(values.maxColours ?? "")}
                className="num"
                error={e.maxColours}
              />
            </Field>
          </div>
        </Section>

        <Section title="Export" hint="What the profile's effects export by default; an export can still choose otherwise.">
          <div role="group" aria-labelledby="dialects-label" aria-describedby={e.dialects ? "profile-dialects-error" : undefined}>
            <p id="dialects-label" className="mb-2 text-xs font-medium uppercase tracking-wide text-ink-400">
              Export dialects <span className="normal-case tracking-normal text-ink-500">(none ticked: every output)</span>
            </p>
            <div className="grid gap-x-4 gap-y-1.5 sm:grid-cols-2 lg:grid-cols-4">
              {options.outputs.map((o) => (
                <label key={o} className="flex items-center gap-2 text-sm text-ink-200">
                  <input
                    type="checkbox"
                    name="dialects"
                    value={o}
                    defaultChecked={values.dialects.includes(o)}
                    className="accent-glass-400"
                  />
                  <span>
                    {OUTPUT_LABELS[o] ?? o} <span className="num text-xs text-ink-500">{o}</span>
                  </span>
                </label>
              ))}
            </div>
            {e.dialects ? (
              <p id="profile-dialects-error" role="alert" className="mt-1 text-sm text-alert-300">
                {e.dialects}
              </p>
            ) : null}
          </div>
          <div className="grid grid-cols-2 gap-3 md:grid-cols-4">
            <Field
              label="Label prefix"
              name="profile-labelPrefix"
              error={e.labelPrefix}
              hint={`Up to ${options.labelPrefixMax} characters; goes before each effect's own label.`}
            >
              <TextInput
                id="profile-labelPrefix"
                name="labelPrefix"
                maxLength={options.labelPrefixMax}
                defaultValue={values.labelPrefix}
                placeholder="say, storm"
                className="num"
                error={e.labelPrefix}
              />
            </Field>
            {choice("sign", "Sign", options.signs, x.sign ?? "shift", "scroll: negated, for scroll registers")}
            <Field
              label="Register width"
              name="profile-registerBits"
              error={e.registerBits}
              hint={`bits, ${options.registerBits.min}–${options.registerBits.max}; empty for plain signed values`}
            >
              <TextInput
                id="profile-registerBits"
                name="registerBits"
                inputMode="numeric"
                defaultValue={x.registerBits == null ? "" : String(x.registerBits)}
                className="num"
                error={e.registerBits}
              />
            </Field>
            {choice("element", "Element type", options.elements, x.element ?? "auto", "auto: the smallest that fits")}
          </div>
          <div className="grid gap-3 md:grid-cols-3">
            {flag("split", "Split 16-bit tables", "Low-byte and high-byte tables, for 8-bit indexed loads.")}
            {flag("half", "Store half tables", "Half of each antisymmetric table; refused at export when a table is not.")}
            {flag("dedupe", "Store identical frames once", "With an index table of frames.")}
          </div>
        </Section>
      </fieldset>
      <FormError>{e.form}</FormError>
      {readOnly ? null : (
        <div className="flex flex-wrap items-center gap-4 border-t border-ink-800 pt-4">
          <Button variant="primary" name="intent" value={intent}>
            {submit}
          </Button>
          {aside ? <div className="text-sm text-ink-400">{aside}</div> : null}
        </div>
      )}
    </Form>
  );
}
