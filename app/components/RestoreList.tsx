import { Form, Link } from "react-router";
import { Button, Counted, Timestamp } from "./ui.tsx";

export interface RestorableView {
  id: string;
  name: string;
  /** When it was deleted or archived. */
  at: Date | string;
  /** Where its name links to; plain text without one. */
  to?: string;
}

/**
 * A folded list of soft-deleted things (archived projects, deleted effects) with a Restore button for
 * each, shown to those allowed to restore. The button posts `intent` with the item's id in `idField`.
 */
export function RestoreList({
  title,
  verb,
  items,
  idField,
  intent,
  canRestore,
  open,
  errorOf,
}: {
  title: string;
  /** How it left the list, before the time: "deleted", "archived". */
  verb: string;
  items: RestorableView[];
  idField: string;
  intent: string;
  canRestore: boolean;
  open?: boolean;
  /** A message to show under one item (say, why restoring it was refused). */
  errorOf?: (id: string) => string | undefined;
}) {
  if (items.length === 0) return null;
  return (
    <details className="mt-5 border-t border-ink-800 pt-4" open={open}>
      <summary className="cursor-pointer text-sm text-ink-400 hover:text-ink-200">
        <Counted label={title} count={items.length} />
      </summary>
      <ul className="mt-3 flex flex-col gap-2">
        {items.map((item) => {
          const error = errorOf?.(item.id);
          return (
            <li key={item.id} className="flex flex-wrap items-center justify-between gap-3 rounded-md bg-ink-850 px-3 py-2 text-sm">
              <span>
                {item.to ? (
                  <Link to={item.to} className="text-ink-200 hover:text-glass-300">
                    {item.name}
                  </Link>
                ) : (
                  <span className="text-ink-200">{item.name}</span>
                )}{" "}
                <span className="text-ink-500">
                  {verb} <Timestamp value={item.at} />
                </span>
              </span>
              {canRestore ? (
                <Form method="post">
                  <input type="hidden" name={idField} value={item.id} />
                  <Button size="sm" name="intent" value={intent}>
                    Restore
                  </Button>
                </Form>
              ) : null}
              {error ? <p className="w-full text-xs text-alert-300">{error}</p> : null}
            </li>
          );
        })}
      </ul>
    </details>
  );
}
