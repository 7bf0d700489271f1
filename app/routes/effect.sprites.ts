import type { Route } from "./+types/effect.sprites";
import { db } from "../db.server.ts";
import { requireEffectRole } from "../guards.server.ts";
import { listSprites } from "../models/sprites.server.ts";

/** The sprites of the effect's project, the ones the bench can attach (kept fresh in the page with SWR). */
export async function loader({ request, params }: Route.LoaderArgs) {
  const { project } = await requireEffectRole(request, params.effectId, "viewer");
  return Response.json(await listSprites(db(), project.id), { headers: { "Cache-Control": "private, no-store" } });
}
