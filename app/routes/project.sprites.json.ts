import type { Route } from "./+types/project.sprites.json";
import { db } from "../db.server.ts";
import { requireProjectRole } from "../guards.server.ts";
import { listSprites } from "../models/sprites.server.ts";

/** A project's sprite list as JSON, for the library to refresh itself (a teammate's upload shows up on focus). */
export async function loader({ request, params }: Route.LoaderArgs) {
  const { project } = await requireProjectRole(request, params.projectId, "viewer");
  return Response.json(await listSprites(db(), project.id), { headers: { "Cache-Control": "private, no-store" } });
}
