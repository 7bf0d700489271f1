// Apart from effect.ts (which builds its checks with zod) so that the command line can recognise the error without loading zod.

/** One problem found in an effect document: the field's dotted path and what is wrong with it. */
export interface EffectIssue {
  readonly path: string;
  readonly message: string;
}

/** Thrown when an effect document is not valid; `issues` names every bad field. */
export class EffectError extends Error {
  readonly issues: readonly EffectIssue[];
  constructor(issues: readonly EffectIssue[]) {
    super(`invalid effect document:\n${issues.map((i) => `  ${i.path || "(document)"}: ${i.message}`).join("\n")}`);
    this.name = "EffectError";
    this.issues = issues;
  }
}
