/**
 * What the frame downloads share: the effect's source picture from the database, query parameters read as an
 * attacker may send them (400 naming the allowed range), and the caching headers of a picture that changes only
 * when the effect or its sprite does.
 */
import { encodePng, type Effect, type Image } from "@skewsmith/core";
import { data } from "react-router";
import type { Db } from "../db/client.server.ts";
import type { EffectRow } from "../db/schema.ts";
import { validDocument } from "../models/effects.server.ts";
import { getSpriteImage } from "../models/sprites.server.ts";
import { FRAME_PASSES, PASS_WORDS, placedSource, type FramePass } from "./frames.ts";

function fail(status: number, message: string): never {
  throw data({ message }, { status });
}

/** The effect's document, validated by core (filling any default a newer core adds). */
export const effectDocument = (effect: EffectRow): Effect => validDocument(effect.document);

/** The effect's source (its sprite placed in the canvas) and a tag that changes with it; 409 when no sprite is attached. */
export async function effectSource(db: Db, effect: EffectRow, document: Effect): Promise<{ source: Image; tag: string }> {
  const loaded = effect.spriteId ? await getSpriteImage(db, effect.spriteId) : null;
  if (!loaded)
    fail(409, `${effect.name} has no sprite attached, so it has no frames to draw. Attach a sprite to the effect in the bench first.`);
  const { sprite, image } = loaded;
  // Changes to the effect (document, placement) move updatedAt; a replaced picture bumps the sprite's version.
  const tag = `${effect.id}.${effect.version}.${effect.updatedAt.getTime()}.${sprite.id}.${sprite.version}`;
  return { source: placedSource(document, image, effect.spriteX, effect.spriteY), tag };
}

/** A whole number from the query, `fallback` when absent; 400 naming the parameter and the range when it is anything else. */
export function wholeParam(
  url: URL,
  name: string,
  range: { min: number; max: number; fallback?: number; meaning?: string },
): number | undefined {
  const values = url.searchParams.getAll(name);
  if (values.length === 0) return range.fallback;
  const text = values[0];
  const n = Number(text);
  if (values.length > 1 || !/^(0|[1-9]\d{0,8})$/.test(text) || n < range.min || n > range.max)
    fail(
      400,
      `${name}: “${text.slice(0, 40)}”${values.length > 1 ? " (given more than once)" : ""} is not allowed; allowed a whole number from ${range.min} to ${range.max}${range.meaning ? ` (${range.meaning})` : ""}.`,
    );
  return n;
}

/** The `pass` query parameter: 0 to 3, the finished frame (3) when absent. */
export function passParam(url: URL): FramePass {
  return wholeParam(url, "pass", {
    min: 0,
    max: 3,
    fallback: 3,
    meaning: FRAME_PASSES.map((p) => `${p} ${PASS_WORDS[p]}`).join(", "),
  }) as FramePass;
}

/** A PNG answer with its file name; 304 when the browser already holds this exact picture. */
export function pngResponse(request: Request, etag: string, fileName: string, build: () => Image): Response {
  const quoted = `"${etag}"`;
  const headers = {
    "Content-Type": "image/png",
    "Content-Disposition": `inline; filename="${fileName}"`,
    "Cache-Control": "private, no-cache",
    ETag: quoted,
    "X-Content-Type-Options": "nosniff",
  };
  const known = (request.headers.get("If-None-Match") ?? "").split(",").map((t) => t.trim());
  if (known.includes(quoted)) return new Response(null, { status: 304, headers });
  return new Response(new Uint8Array(encodePng(build())), { headers });
}
