/** Small form pieces the bench's settings share: a text field with its message, a select, a checkbox, a section. */
import type { ReactNode } from "react";
import type { BenchErrors } from "../../bench/form.ts";

const INPUT =
  "w-full rounded-md border border-ink-600 bg-ink-900 px-2.5 py-1.5 text-sm text-ink-100 placeholder:text-ink-500 focus:border-glass-400 focus:outline-none aria-[invalid=true]:border-alert-400 read-only:border-ink-700 read-only:bg-ink-950 read-only:text-ink-300 disabled:opacity-70";

export function BenchSection({ title, children, actions }: { title: string; children: ReactNode; actions?: ReactNode }) {
  return (
    <fieldset className="border-t border-ink-800 pt-3 first:border-0 first:pt-0">
      <legend className="float-left mb-2 flex w-full items-center justify-between gap-2 text-xs font-semibold uppercase tracking-wide text-ink-300">
        <span>{title}</span>
        {actions}
      </legend>
      <div className="clear-both flex flex-col gap-3">{children}</div>
    </fieldset>
  );
}

function Message({ id, error, hint }: { id: string; error?: string; hint?: ReactNode }) {
  if (error)
    return (
      <p id={`${id}-error`} className="text-xs text-alert-300" data-testid={`error-${id}`}>
        {error}
      </p>
    );
  return hint ? (
    <p id={`${id}-hint`} className="text-xs text-ink-400">
      {hint}
    </p>
  ) : null;
}

/** A text field of the bench: typed as text (so a bad value stays visible), with core's message or a hint below it. */
export function TextField({
  name,
  label,
  value,
  onChange,
  errors,
  hint,
  readOnly,
  placeholder,
  inputMode = "decimal",
  suffix,
}: {
  name: string;
  label: string;
  value: string;
  onChange: (value: string) => void;
  errors?: BenchErrors;
  hint?: ReactNode;
  readOnly?: boolean;
  placeholder?: string;
  inputMode?: "decimal" | "numeric" | "text";
  suffix?: string;
}) {
  const error = errors?.[name];
  return (
    <div className="flex min-w-0 flex-col gap-1">
      <label htmlFor={name} className="text-xs font-medium text-ink-300">
        {label}
      </label>
      <div className="flex items-center gap-1.5">
        <input
          id={name}
          name={name}
          type="text"
          inputMode={inputMode}
          autoComplete="off"
          spellCheck={false}
          value={value}
          readOnly={readOnly}
          placeholder={placeholder}
          onChange={(e) => onChange(e.target.value)}
          aria-invalid={error ? true : undefined}
          aria-describedby={error ? `${name}-error` : hint ? `${name}-hint` : undefined}
          className={`${INPUT} num`}
        />
        {suffix ? <span className="text-xs text-ink-400">{suffix}</span> : null}
      </div>
      <Message id={name} error={error} hint={hint} />
    </div>
  );
}

export function SelectField({
  name,
  label,
  value,
  onChange,
  options,
  errors,
  hint,
  disabled,
}: {
  name: string;
  label: string;
  value: string;
  onChange: (value: string) => void;
  options: { value: string; label: string }[];
  errors?: BenchErrors;
  hint?: ReactNode;
  disabled?: boolean;
}) {
  const error = errors?.[name];
  return (
    <div className="flex min-w-0 flex-col gap-1">
      <label htmlFor={name} className="text-xs font-medium text-ink-300">
        {label}
      </label>
      <select
        id={name}
        name={name}
        value={value}
        disabled={disabled}
        onChange={(e) => onChange(e.target.value)}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? `${name}-error` : hint ? `${name}-hint` : undefined}
        className={`${INPUT} pr-8`}
      >
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
      <Message id={name} error={error} hint={hint} />
    </div>
  );
}

export function CheckField({
  name,
  label,
  checked,
  onChange,
  disabled,
  hint,
}: {
  name: string;
  label: ReactNode;
  checked: boolean;
  onChange: (checked: boolean) => void;
  disabled?: boolean;
  hint?: ReactNode;
}) {
  return (
    <div className="flex flex-col gap-0.5">
      <label className="inline-flex items-center gap-2 text-sm text-ink-200">
        <input
          type="checkbox"
          name={name}
          checked={checked}
          disabled={disabled}
          onChange={(e) => onChange(e.target.checked)}
          aria-describedby={hint ? `${name}-hint` : undefined}
          className="h-4 w-4 accent-glass-400"
        />
        {label}
      </label>
      {hint ? (
        <p id={`${name}-hint`} className="pl-6 text-xs text-ink-400">
          {hint}
        </p>
      ) : null}
    </div>
  );
}
