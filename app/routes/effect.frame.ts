import { data } from "react-router";
import type { Route } from "./+types/effect.frame";
import { db } from "../db.server.ts";
import { effectDocument, effectSource, passParam, pngResponse } from "../effects/frames.server.ts";
import { frameCount, framePicture } from "../effects/frames.ts";
import { fileSlug } from "../files.ts";
import { requireEffectRole } from "../guards.server.ts";

/**
 * `GET /effects/:effectId/frames/:n.png?pass=P`: frame n (0-based) after pass P (0 the placed source, 1, 2, 3 the
 * finished frame, the default) as a PNG, drawn by core: indexed with the sprite's palette when the sprite is indexed
 * (index 0 the background), RGBA otherwise. For members of the effect's team (viewers too).
 */
export async function loader({ request, params }: Route.LoaderArgs) {
  const { effect } = await requireEffectRole(request, params.effectId, "viewer");
  const pass = passParam(new URL(request.url));
  const document = effectDocument(effect);
  const frames = frameCount(document);
  const match = /^(0|[1-9]\d{0,8})\.png$/.exec(params.frameFile);
  const n = match ? Number(match[1]) : NaN;
  if (!(n < frames))
    throw data(
      {
        message: `Frame “${params.frameFile.slice(0, 40)}” is not allowed: ask for /frames/N.png with N a whole number from 0 to ${frames - 1} (frames count from 0).`,
      },
      { status: 400 },
    );
  const { source, tag } = await effectSource(db(), effect, document);
  const name = `${fileSlug(effect.name, "effect")}-frame-${n}${pass === 3 ? "" : `-pass-${pass}`}.png`;
  return pngResponse(request, `${tag}.${n}.${pass}`, name, () => framePicture(document, source, n, pass));
}
