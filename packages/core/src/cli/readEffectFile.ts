import { parseEffect, type Effect } from "../effect.ts";
import { UsageError, type CliIo } from "./io.ts";

/** Reads and validates an effect document from a JSON file; bad JSON or bad fields become a UsageError naming the file. */
export async function readEffectFile(path: string | undefined, io: CliIo): Promise<Effect> {
  if (!path) throw new UsageError("missing EFFECT.json (the effect document to read)");
  const bytes = await io.readFile(path);
  let json: unknown;
  try {
    json = JSON.parse(new TextDecoder().decode(bytes));
  } catch (error) {
    throw new UsageError(`${path}: not valid JSON (${error instanceof Error ? error.message : String(error)})`);
  }
  try {
    return parseEffect(json);
  } catch (error) {
    if (error instanceof Error) error.message = `${path}: ${error.message}`;
    throw error;
  }
}
