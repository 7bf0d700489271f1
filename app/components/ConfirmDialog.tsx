import { useId, useRef, type ReactNode } from "react";
import { Form, Link } from "react-router";
import { Button, buttonClass, Crumbs, type Crumb } from "./ui.tsx";

/** What a confirmation asks and what confirming posts. */
export interface ConfirmQuestion {
  title: string;
  /** What the change does, said before it is done. */
  children: ReactNode;
  /** The confirm button's text. */
  confirm: string;
  intent: string;
  fields: Record<string, string | number>;
  /** Where confirming posts to; the current route when not given. */
  action?: string;
}

/**
 * A destructive change that asks first. Without JavaScript the trigger is a link to a page of its own that asks
 * (`confirmPage`, see ConfirmPage); with JavaScript it opens a modal <dialog> asking the same (the browser traps
 * focus, Escape closes it, and focus starts on Cancel). Confirming posts `intent` with `fields` and `confirmed=yes`.
 */
export function ConfirmDialog({
  trigger,
  triggerLabel,
  confirmPage,
  size = "sm",
  ...question
}: ConfirmQuestion & {
  /** The trigger's text. */
  trigger: string;
  /** The trigger's accessible name, when the text alone is ambiguous (say, "Remove Ada"). */
  triggerLabel?: string;
  confirmPage: string;
  size?: "sm" | "md";
}) {
  const dialog = useRef<HTMLDialogElement>(null);
  const id = useId();
  return (
    <>
      <Link
        to={confirmPage}
        aria-label={triggerLabel}
        aria-haspopup="dialog"
        className={buttonClass("danger", size)}
        onClick={(event) => {
          if (!dialog.current?.showModal) return;
          event.preventDefault();
          dialog.current.showModal();
        }}
      >
        {trigger}
      </Link>
      <dialog
        ref={dialog}
        aria-labelledby={`${id}-title`}
        aria-describedby={`${id}-body`}
        className="m-auto w-[min(32rem,calc(100vw-2rem))] rounded-lg border border-ink-600 bg-ink-900 p-0 text-left text-ink-100 shadow-2xl backdrop:bg-ink-950/70"
      >
        <ConfirmBody {...question} id={id} onCancel={() => dialog.current?.close()} onSubmit={() => dialog.current?.close()} />
      </dialog>
    </>
  );
}

/** The same question as a page of its own, for browsers without JavaScript; Cancel goes back to `back`. */
export function ConfirmPage({ crumbs, back, ...question }: ConfirmQuestion & { crumbs: Crumb[]; back: string }) {
  const id = useId();
  return (
    <div className="mx-auto flex max-w-xl flex-col gap-4">
      <Crumbs items={crumbs} />
      <div className="rounded-lg border border-ink-700 bg-ink-900">
        <ConfirmBody {...question} id={id} heading="h1" cancelTo={back} />
      </div>
    </div>
  );
}

/** The question and its two buttons, shared by the dialog and the page. */
function ConfirmBody({
  id,
  title,
  children,
  confirm,
  intent,
  fields,
  action,
  cancelTo,
  onCancel,
  onSubmit,
  heading = "h2",
}: ConfirmQuestion & {
  id: string;
  /** h1 on a page of its own, h2 inside a dialog. */
  heading?: "h1" | "h2";
  /** Where Cancel goes on the page without JavaScript. */
  cancelTo?: string;
  onCancel?: () => void;
  onSubmit?: () => void;
}) {
  const Heading = heading;
  return (
    <Form method="post" action={action} preventScrollReset onSubmit={onSubmit} className="flex flex-col gap-4 p-6">
      <Heading id={`${id}-title`} className={heading === "h1" ? "text-xl font-semibold" : "text-lg font-semibold"}>
        {title}
      </Heading>
      <div id={`${id}-body`} className="flex flex-col gap-2 text-sm text-ink-300">
        {children}
      </div>
      {Object.entries(fields).map(([name, value]) => (
        <input key={name} type="hidden" name={name} value={value} />
      ))}
      <input type="hidden" name="confirmed" value="yes" />
      <div className="flex flex-wrap justify-end gap-2">
        {cancelTo ? (
          <Link to={cancelTo} className={buttonClass("secondary")}>
            Cancel
          </Link>
        ) : (
          // The safe choice gets the focus when the dialog opens.
          <Button type="button" autoFocus onClick={onCancel}>
            Cancel
          </Button>
        )}
        <Button variant="danger" name="intent" value={intent} className="border border-alert-400/50">
          {confirm}
        </Button>
      </div>
    </Form>
  );
}
