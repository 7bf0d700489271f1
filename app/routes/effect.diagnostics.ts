import type { Route } from "./+types/effect.diagnostics";
import { savedDiagnostics } from "../bench/saved.server.ts";
import { db } from "../db.server.ts";
import { requireEffectRole } from "../guards.server.ts";

/** The per-frame diagnostics of the saved effect, over its sprite's opaque pixels and its key pixels (the bench's table). */
export async function loader({ request, params }: Route.LoaderArgs) {
  const { effect } = await requireEffectRole(request, params.effectId, "viewer");
  return Response.json(await savedDiagnostics(db(), effect), { headers: { "Cache-Control": "private, no-store" } });
}
