/** The sprite library's forms: one zod schema each, shared by the library component and the sprite route's action. */
import { z } from "zod";
import { BIDI, CONTROL, nameText } from "../forms.ts";
import { SPRITE_MAX_BYTES } from "./pngHeader.ts";

/** The most the sprite library's address reads of a form: a file of SPRITE_MAX_BYTES, the multipart envelope and the other fields. */
export const SPRITE_FORM_MAX_BYTES = SPRITE_MAX_BYTES + 64 * 1024;

const spriteId = z.string({ error: "Choose a sprite." }).uuid("That sprite does not exist.");
/** The sprite's version when the person looked at it: a change from an older one is refused (409). */
const version = z.coerce
  .number({ error: "The form does not say which version of the sprite it changes; reload the page." })
  .int("The form does not say which version of the sprite it changes; reload the page.")
  .min(1, "The form does not say which version of the sprite it changes; reload the page.");

/** A new sprite: the file comes as the `file` field; an empty name means "the file's own name". */
export const uploadSpriteForm = z.object({ name: z.string().trim().default("") });

export const renameSpriteForm = z.object({ spriteId, version, name: nameText("sprite") });

/** A new picture for a sprite: the file comes as the `file` field. */
export const replaceSpriteForm = z.object({ spriteId, version });

/** `users` lists the ids of the effects the person was told use the sprite, separated by commas. */
export const deleteSpriteForm = z.object({
  spriteId,
  version,
  users: z
    .string()
    .default("")
    .transform((v) => v.split(",").filter(Boolean))
    .pipe(z.array(z.string().uuid("The list of effects in the form is damaged; reload the page."))),
});

/** The name a sprite gets from its file: no folders, no control or bidirectional characters, at most `max` characters. */
export function nameFromFile(fileName: string, max: number): string {
  return (fileName.split(/[\\/]/).pop() ?? "")
    .replace(new RegExp(CONTROL.source, "g"), "")
    .replace(new RegExp(BIDI.source, "g"), "")
    .trim()
    .slice(0, max)
    .trim();
}
