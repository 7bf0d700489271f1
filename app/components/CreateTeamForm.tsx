import { Form } from "react-router";
import { createTeamForm, NAME_MAX } from "../forms.ts";
import { STARTER_PROFILES } from "../profiles/starters.ts";
import { Button, Field, FormError, TextInput } from "./ui.tsx";
import { useFormCheck } from "./useFormCheck.ts";

/**
 * Creates a team (the creator becomes its owner), with any of the generic starting target profiles ticked.
 * Posts to /teams/new, which shows any field messages.
 */
export function CreateTeamForm({ errors: serverErrors, defaultName }: { errors?: Record<string, string>; defaultName?: string }) {
  const check = useFormCheck(createTeamForm);
  const errors = check.errors ?? serverErrors;
  return (
    <Form method="post" action="/teams/new" className="flex flex-col gap-3" aria-label="Create a team" onSubmit={check.onSubmit} noValidate>
      <FormError>{errors?.form}</FormError>
      <div className="flex flex-wrap items-end gap-3">
        <div className="min-w-56 flex-1">
          <Field label="Team name" name="name" error={errors?.name} hint="You become the team's owner and can add members later.">
            <TextInput
              name="name"
              maxLength={NAME_MAX}
              required
              placeholder="Say, Night Shift Demos"
              defaultValue={defaultName}
              error={errors?.name}
            />
          </Field>
        </div>
        <Button variant="primary" className="mb-[1px]" name="intent" value="create-team">
          Create team
        </Button>
      </div>
      <details className="text-sm" open={errors?.starter !== undefined || undefined}>
        <summary className="cursor-pointer text-ink-400 hover:text-ink-200">Start with target profiles (optional)</summary>
        <fieldset className="mt-2 flex flex-col gap-1.5">
          <legend className="mb-1 text-xs text-ink-400">
            Generic presets by screen size and CPU family; their hardware values are from memory, so check them. You can add or change them
            later.
          </legend>
          {STARTER_PROFILES.map((s) => (
            <label key={s.key} className="flex items-center gap-2 text-ink-200">
              <input type="checkbox" name="starter" value={s.key} className="accent-glass-400" />
              <span className="num">{s.settings.name}</span>
            </label>
          ))}
        </fieldset>
        {errors?.starter ? <p className="mt-1 text-alert-300">{errors.starter}</p> : null}
      </details>
    </Form>
  );
}
