import { data } from "react-router";
import type { Route } from "./+types/sprite.image";
import { db } from "../db.server.ts";
import { requireProjectRole, requireUser } from "../guards.server.ts";
import { getSpriteFile } from "../models/sprites.server.ts";

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** A sprite's PNG file, as stored, for members of its project's team. */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requireUser(request);
  const sprite = UUID.test(params.spriteId) ? await getSpriteFile(db(), params.spriteId) : null;
  if (!sprite) throw data({ message: "This sprite does not exist, or you are not a member of its team." }, { status: 404 });
  await requireProjectRole(request, sprite.projectId, "viewer");
  return new Response(new Uint8Array(sprite.png), {
    headers: {
      "Content-Type": "image/png",
      "Content-Disposition": `inline; filename="${sprite.name.replace(/["\\\r\n]/g, "")}"`,
      "Cache-Control": "private, max-age=3600",
    },
  });
}
