import type { ComponentProps, ReactNode } from "react";
import { Link } from "react-router";
import type { Role } from "../roles.ts";

function cx(...classes: (string | false | null | undefined)[]): string {
  return classes.filter(Boolean).join(" ");
}

/** Skewsmith's mark: a block cut into strips, each strip pushed along a little more than the last (a shear). */
export function LogoMark({ className = "h-6 w-6" }: { className?: string }) {
  return (
    <svg viewBox="0 0 24 24" className={className} aria-hidden="true" focusable="false">
      <rect x="2" y="3" width="12" height="3.4" rx="0.8" fill="var(--color-glass-300)" />
      <rect x="4.5" y="7.6" width="12" height="3.4" rx="0.8" fill="var(--color-glass-400)" />
      <rect x="7" y="12.2" width="12" height="3.4" rx="0.8" fill="var(--color-glass-500)" />
      <rect x="9.5" y="16.8" width="12" height="3.4" rx="0.8" fill="var(--color-glass-700)" />
      <circle cx="12" cy="12" r="1.3" fill="var(--color-ink-950)" />
    </svg>
  );
}

export function Wordmark() {
  return (
    <span className="inline-flex items-center gap-2 font-mono text-[15px] font-semibold tracking-tight text-ink-100">
      <LogoMark />
      skewsmith
    </span>
  );
}

type ButtonVariant = "primary" | "secondary" | "quiet" | "danger";

const BUTTON: Record<ButtonVariant, string> = {
  primary: "bg-glass-400 text-ink-950 hover:bg-glass-300 font-medium",
  secondary: "border border-ink-600 text-ink-100 hover:border-ink-400 hover:bg-ink-800",
  quiet: "text-ink-300 hover:text-ink-100 hover:bg-ink-800",
  danger: "text-alert-300 hover:bg-alert-900",
};

export function buttonClass(variant: ButtonVariant = "secondary", size: "sm" | "md" = "md"): string {
  return cx(
    "inline-flex items-center justify-center gap-1.5 rounded-md transition-colors disabled:opacity-50 disabled:cursor-not-allowed cursor-pointer whitespace-nowrap",
    size === "sm" ? "px-2 py-1 text-xs" : "px-3.5 py-2 text-sm",
    BUTTON[variant],
  );
}

export function Button({
  variant = "secondary",
  size = "md",
  className,
  ...props
}: ComponentProps<"button"> & { variant?: ButtonVariant; size?: "sm" | "md" }) {
  return <button type="submit" {...props} className={cx(buttonClass(variant, size), className)} />;
}

const INPUT =
  "w-full rounded-md border border-ink-600 bg-ink-900 px-3 py-2 text-sm text-ink-100 placeholder:text-ink-500 focus:border-glass-400 focus:outline-none aria-[invalid=true]:border-alert-400";

export function Field({
  label,
  name,
  error,
  hint,
  children,
}: {
  label: string;
  name: string;
  error?: string;
  hint?: ReactNode;
  children: ReactNode;
}) {
  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={name} className="text-xs font-medium uppercase tracking-wide text-ink-400">
        {label}
      </label>
      {children}
      {error ? (
        <p id={`${name}-error`} className="text-sm text-alert-300" role="alert">
          {error}
        </p>
      ) : hint ? (
        <p className="text-xs text-ink-400">{hint}</p>
      ) : null}
    </div>
  );
}

export function TextInput({ error, ...props }: ComponentProps<"input"> & { error?: string }) {
  return (
    <input
      id={props.name}
      {...props}
      aria-invalid={error ? true : undefined}
      aria-describedby={error ? `${props.id ?? props.name}-error` : undefined}
      className={cx(INPUT, props.className)}
    />
  );
}

export function TextArea({ error, ...props }: ComponentProps<"textarea"> & { error?: string }) {
  return (
    <textarea
      id={props.name}
      rows={3}
      {...props}
      aria-invalid={error ? true : undefined}
      aria-describedby={error ? `${props.id ?? props.name}-error` : undefined}
      className={cx(INPUT, props.className)}
    />
  );
}

export function Select({ error, ...props }: ComponentProps<"select"> & { error?: string }) {
  return (
    <select id={props.id ?? props.name} {...props} aria-invalid={error ? true : undefined} className={cx(INPUT, "pr-8", props.className)} />
  );
}

/** A message about the whole form (not one field). */
export function FormError({ children }: { children?: ReactNode }) {
  if (!children) return null;
  return (
    <p className="rounded-md border border-alert-400/40 bg-alert-900/60 px-3 py-2 text-sm text-alert-300" role="alert">
      {children}
    </p>
  );
}

export function Notice({ children }: { children: ReactNode }) {
  return <div className="rounded-md border border-glass-700 bg-glass-900/60 px-4 py-3 text-sm text-glass-200">{children}</div>;
}

export function Panel({ title, actions, children, id }: { title: ReactNode; actions?: ReactNode; children: ReactNode; id?: string }) {
  return (
    <section aria-labelledby={id} className="rounded-lg border border-ink-700 bg-ink-900">
      <header className="flex flex-wrap items-center justify-between gap-3 border-b border-ink-700 px-5 py-3">
        <h2 id={id} className="text-sm font-semibold text-ink-100">
          {title}
        </h2>
        {actions}
      </header>
      <div className="px-5 py-4">{children}</div>
    </section>
  );
}

export function EmptyState({ title, children }: { title: string; children?: ReactNode }) {
  return (
    <div className="rounded-md border border-dashed border-ink-600 px-5 py-6 text-center">
      <p className="font-medium text-ink-200">{title}</p>
      {children ? <div className="mt-1 text-sm text-ink-400">{children}</div> : null}
    </div>
  );
}

const ROLE_STYLE: Record<Role, string> = {
  owner: "border-glass-500 text-glass-300",
  editor: "border-ink-400 text-ink-200",
  viewer: "border-ink-600 text-ink-400",
};

export function RoleBadge({ role }: { role: Role }) {
  return (
    <span className={cx("inline-block rounded-full border px-2 py-px text-xs", ROLE_STYLE[role])} data-role={role}>
      {role}
    </span>
  );
}

const DATE = new Intl.DateTimeFormat("en-GB", {
  day: "numeric",
  month: "short",
  year: "numeric",
  hour: "2-digit",
  minute: "2-digit",
  timeZone: "UTC",
});

/**
 * The texts of moments already shown, by milliseconds since 1970: a page lists the same few dozen (activity, effects,
 * sprites) on every load, and formatting one costs more than the rest of its element. Bounded, the oldest first out.
 */
const shown = new Map<number, { iso: string; text: string }>();
const SHOWN_MAX = 2048;

function moment(date: Date): { iso: string; text: string } {
  const ms = date.getTime();
  let texts = shown.get(ms);
  if (!texts) {
    texts = { iso: date.toISOString(), text: `${DATE.format(date)} UTC` };
    shown.set(ms, texts);
    if (shown.size > SHOWN_MAX) shown.delete(shown.keys().next().value!);
  }
  return texts;
}

/** A moment, in UTC so the server and the browser print the same text. */
export function Timestamp({ value }: { value: Date | string }) {
  const { iso, text } = moment(typeof value === "string" ? new Date(value) : value);
  return (
    <time dateTime={iso} className="num whitespace-nowrap text-ink-300">
      {text}
    </time>
  );
}

export interface Crumb {
  label: string;
  to?: string;
}

export function Crumbs({ items }: { items: Crumb[] }) {
  return (
    <nav aria-label="Breadcrumb" className="mb-2 text-sm text-ink-400">
      <ol className="flex flex-wrap items-center gap-1.5">
        {items.map((c, i) => (
          <li key={`${c.label}-${i}`} className="flex items-center gap-1.5">
            {i > 0 ? (
              <span aria-hidden="true" className="text-ink-600">
                /
              </span>
            ) : null}
            {c.to ? (
              <Link to={c.to} className="hover:text-glass-300">
                {c.label}
              </Link>
            ) : (
              <span aria-current="page" className="text-ink-200">
                {c.label}
              </span>
            )}
          </li>
        ))}
      </ol>
    </nav>
  );
}

export function PageTitle({ title, meta, actions }: { title: ReactNode; meta?: ReactNode; actions?: ReactNode }) {
  return (
    <div className="mb-6 flex flex-wrap items-end justify-between gap-4">
      <div className="min-w-0">
        <h1 className="text-2xl font-semibold tracking-tight text-ink-100">{title}</h1>
        {meta ? <div className="mt-1 flex flex-wrap items-center gap-2 text-sm text-ink-400">{meta}</div> : null}
      </div>
      {actions ? <div className="flex flex-wrap items-center gap-2">{actions}</div> : null}
    </div>
  );
}

/** A label followed by a count in figures, say "Members (3)". */
export function Counted({ label, count }: { label: ReactNode; count: number }) {
  return (
    <>
      {label} (<span className="num">{count}</span>)
    </>
  );
}

function headerClass(align: "left" | "right"): string {
  return cx("px-3 py-2 font-medium", align === "right" ? "text-right" : "text-left");
}

/** A plain column header; right-align the ones over figures. */
export function ColumnHeader({ label, align = "left" }: { label: ReactNode; align?: "left" | "right" }) {
  return (
    <th scope="col" className={headerClass(align)}>
      {label}
    </th>
  );
}

/** The header over a column of row buttons: named for screen readers, blank on screen. */
export function ActionsHeader() {
  return (
    <th scope="col" className="px-3 py-2">
      <span className="sr-only">Actions</span>
    </th>
  );
}

/** A header cell that sorts a table by following a link (works without JavaScript). */
export function SortHeader({
  label,
  sort,
  current,
  dir,
  align = "left",
}: {
  label: string;
  sort: string;
  current: string;
  dir: "asc" | "desc";
  align?: "left" | "right";
}) {
  const active = sort === current;
  const next = active && dir === "asc" ? "desc" : "asc";
  return (
    <th scope="col" aria-sort={active ? (dir === "asc" ? "ascending" : "descending") : "none"} className={headerClass(align)}>
      <Link
        to={`?sort=${sort}&dir=${next}`}
        preventScrollReset
        className={cx("inline-flex items-center gap-1 hover:text-glass-300", active && "text-ink-100")}
      >
        {label}
        <span aria-hidden="true" className="num text-[10px]">
          {active ? (dir === "asc" ? "▲" : "▼") : "↕"}
        </span>
      </Link>
    </th>
  );
}

export const TABLE = "w-full border-collapse text-sm";
export const THEAD = "border-b border-ink-700 text-xs uppercase tracking-wide text-ink-400";
export const TROW = "border-b border-ink-800 last:border-0 hover:bg-ink-850";
export const TCELL = "px-3 py-2.5 align-middle";
