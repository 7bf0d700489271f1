import type { Route } from "./+types/effect.document";
import { fileSlug } from "../files.ts";
import { requireEffectRole } from "../guards.server.ts";
import { contentDisposition } from "../http.server.ts";
import { validDocument } from "../models/effects.server.ts";

/** The effect document as a file, for the CLI (`skewsmith tables effect.json`). */
export async function loader({ request, params }: Route.LoaderArgs) {
  const { effect } = await requireEffectRole(request, params.effectId, "viewer");
  const slug = fileSlug(effect.name, "effect");
  return new Response(`${JSON.stringify(validDocument(effect.document), null, 2)}\n`, {
    headers: {
      "Content-Type": "application/json; charset=utf-8",
      "Content-Disposition": contentDisposition("attachment", `${slug}.effect.json`),
      "Cache-Control": "private, no-store",
    },
  });
}
