import type { Route } from "./+types/sprite.image";
import { db } from "../db.server.ts";
import { isUuid, notFound, requireProjectRole, requireUser } from "../guards.server.ts";
import { contentDisposition } from "../http.server.ts";
import { getSpriteFile } from "../models/sprites.server.ts";

/** A sprite's PNG file, as stored, for members of its project's team (anyone else: the one 404 answer). */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requireUser(request);
  const sprite = isUuid(params.spriteId) ? await getSpriteFile(db(), params.spriteId) : null;
  if (!sprite) notFound();
  await requireProjectRole(request, sprite.projectId, "viewer");
  return new Response(new Uint8Array(sprite.png), {
    headers: {
      "Content-Type": "image/png",
      "Content-Disposition": contentDisposition("inline", sprite.name),
      "Cache-Control": "private, max-age=3600",
    },
  });
}
