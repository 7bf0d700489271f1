import { useState, type FormEvent } from "react";
import type { z } from "zod";
import { parseForm, type FieldErrors } from "../forms.ts";

/**
 * Checks a form in the browser with the same zod schema its action uses, so a person sees the field
 * messages without a round trip. The action checks again: this only saves time, it guards nothing.
 */
export function useFormCheck(schema: z.ZodType) {
  const [errors, setErrors] = useState<FieldErrors | undefined>();
  function onSubmit(event: FormEvent<HTMLFormElement>) {
    const submitter = (event.nativeEvent as SubmitEvent).submitter;
    const result = parseForm(schema, new FormData(event.currentTarget, submitter));
    if (result.ok) {
      setErrors(undefined);
    } else {
      event.preventDefault();
      setErrors(result.errors);
    }
  }
  return { errors, onSubmit };
}
