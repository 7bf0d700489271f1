import { data } from "react-router";
import type { Route } from "./+types/sprite.image";
import { db } from "../db.server.ts";
import { requireProjectRole, requireUser } from "../guards.server.ts";
import { getSpriteFile } from "../models/sprites.server.ts";

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/**
 * A sprite's PNG file, as stored, for members of its project's team. A replacement keeps the sprite's id, so an
 * address naming the current version (`?v=N`, what the pages use) may be cached for good; any other is revalidated.
 */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requireUser(request);
  const sprite = UUID.test(params.spriteId) ? await getSpriteFile(db(), params.spriteId) : null;
  if (!sprite) throw data({ message: "This sprite does not exist, or you are not a member of its team." }, { status: 404 });
  await requireProjectRole(request, sprite.projectId, "viewer");
  const etag = `"${params.spriteId}.${sprite.version}"`;
  const current = new URL(request.url).searchParams.get("v") === String(sprite.version);
  const headers = {
    "Content-Type": "image/png",
    // A plain ASCII name for every browser, and the exact one per RFC 6266 / RFC 5987 (headers carry bytes, not text).
    "Content-Disposition": `inline; filename="${sprite.name.replace(/[^\x20-\x7e]|["\\]/g, "_")}"; filename*=UTF-8''${encodeURIComponent(sprite.name).replace(/['()*]/g, (c) => `%${c.charCodeAt(0).toString(16).toUpperCase()}`)}`,
    "Cache-Control": current ? "private, max-age=31536000, immutable" : "private, no-cache",
    ETag: etag,
    "X-Content-Type-Options": "nosniff",
  };
  if ((request.headers.get("If-None-Match") ?? "").split(",").some((t) => t.trim() === etag))
    return new Response(null, { status: 304, headers });
  return new Response(new Uint8Array(sprite.png), { headers });
}
