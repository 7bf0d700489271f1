import { expect } from "vitest";
import { DomainError } from "../../app/models/errors.ts";

/** The DomainError a piece of work is refused with (the test fails if it succeeds or throws anything else). */
export async function refusalOf(work: Promise<unknown> | (() => unknown)): Promise<DomainError> {
  const error = await Promise.resolve()
    .then(() => (typeof work === "function" ? work() : work))
    .then(
      () => null,
      (e: unknown) => e,
    );
  expect(error).toBeInstanceOf(DomainError);
  return error as DomainError;
}
