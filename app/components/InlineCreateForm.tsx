import type { FormEventHandler, ReactNode } from "react";
import { Form } from "react-router";
import { Button, FormError } from "./ui.tsx";

/**
 * The one-row form under a list that adds to it: two fields (the children), the button that posts
 * `intent`, then any message about the whole form. Checked in the browser by `onSubmit` first.
 */
export function InlineCreateForm({
  label,
  columns,
  intent,
  submit,
  onSubmit,
  formError,
  children,
}: {
  /** The form's accessible name. */
  label: string;
  /** The grid's tracks from md up, as a whole Tailwind class (three: two fields and the button). */
  columns: string;
  intent: string;
  submit: string;
  onSubmit: FormEventHandler<HTMLFormElement>;
  formError?: string;
  children: ReactNode;
}) {
  return (
    <Form
      method="post"
      className={`mt-5 grid gap-3 border-t border-ink-800 pt-5 ${columns} md:items-start`}
      aria-label={label}
      onSubmit={onSubmit}
      noValidate
    >
      {children}
      <div className="md:pt-5">
        <Button variant="primary" name="intent" value={intent}>
          {submit}
        </Button>
      </div>
      <div className="md:col-span-3">
        <FormError>{formError}</FormError>
      </div>
    </Form>
  );
}
