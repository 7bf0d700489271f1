import { Form } from "react-router";
import { createTeamForm, NAME_MAX } from "../forms.ts";
import { Button, Field, FormError, TextInput } from "./ui.tsx";
import { useFormCheck } from "./useFormCheck.ts";

/** Creates a team (the creator becomes its owner). Posts to /teams/new, which shows any field messages. */
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
    </Form>
  );
}
