import type { Route } from "./+types/sprite.image";
import { db } from "../db.server.ts";
import { isUuid, notFound, requireProjectRole, requireUser } from "../guards.server.ts";
import { contentDisposition } from "../http.server.ts";
import { getSpriteFile } from "../models/sprites.server.ts";

/**
 * A sprite's PNG file, as stored, for members of its project's team (anyone else: the one 404 answer). A replacement
 * keeps the sprite's id, so an address naming the current version (`?v=N`, what the pages use) may be cached for
 * good; any other is revalidated.
 */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requireUser(request);
  const sprite = isUuid(params.spriteId) ? await getSpriteFile(db(), params.spriteId) : null;
  if (!sprite) notFound();
  await requireProjectRole(request, sprite.projectId, "viewer");
  const etag = `"${params.spriteId}.${sprite.version}"`;
  const current = new URL(request.url).searchParams.get("v") === String(sprite.version);
  const headers = {
    "Content-Type": "image/png",
    "Content-Disposition": contentDisposition("inline", sprite.name),
    "Cache-Control": current ? "private, max-age=31536000, immutable" : "private, no-cache",
    ETag: etag,
    "X-Content-Type-Options": "nosniff",
  };
  if ((request.headers.get("If-None-Match") ?? "").split(",").some((t) => t.trim() === etag))
    return new Response(null, { status: 304, headers });
  return new Response(new Uint8Array(sprite.png), { headers });
}
