// Free of zod and core, so that forms shown in the browser (the target profile form) can use it and stay light.

/** The message for a file sent where a form takes text. */
export const notText = (name: string) => `“${name}” must be text, not a file.`;
/** The message for a single-valued field sent more than once. */
export const sentTwice = (name: string, times: number) => `The form sent “${name}” ${times} times; it takes one value.`;

/**
 * What is wrong with the shape of a form whose fields are read one by one (not through parseForm): one of the
 * single-valued `names` sent twice, or a file where text belongs. Empty when the shape is right.
 */
export function formShapeErrors(form: FormData, names: Iterable<string>): Record<string, string> {
  const problems: Record<string, string> = {};
  for (const name of names) {
    const all = form.getAll(name);
    if (all.some((v) => typeof v !== "string")) problems[name] = notText(name);
    else if (all.length > 1) problems[name] = sentTwice(name, all.length);
  }
  return problems;
}
