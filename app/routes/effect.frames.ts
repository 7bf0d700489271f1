import { data } from "react-router";
import type { Route } from "./+types/effect.frames";
import { db } from "../db.server.ts";
import { effectDocument, effectSource, passParam, pngResponse, wholeParam } from "../effects/frames.server.ts";
import { contactSheet, frameCount, SheetError, sheetLayout, SHEET_MAX_ZOOM, type SheetLayout } from "../effects/frames.ts";
import { fileSlug } from "../files.ts";
import { requireEffectRole } from "../guards.server.ts";

/**
 * `GET /effects/:effectId/frames.png?pass=P&zoom=Z&every=K&columns=C`: a contact sheet of the frames after pass P (3
 * by default), left to right and top to bottom, at zoom Z (1 to 8, default 1), with a 2-pixel grey gap. Sheets are at
 * most 4096 × 4096 pixels in area and 16384 on a side: without `every` the sheet takes every frame, or every K-th
 * frame for the smallest K that fits (said in the file name); with `every` too large a sheet is a 400 that says so.
 */
export async function loader({ request, params }: Route.LoaderArgs) {
  const { effect } = await requireEffectRole(request, params.effectId, "viewer");
  const url = new URL(request.url);
  const pass = passParam(url);
  const document = effectDocument(effect);
  const frames = frameCount(document);
  const zoom = wholeParam(url, "zoom", { min: 1, max: SHEET_MAX_ZOOM, fallback: 1, meaning: "screen pixels per canvas pixel" });
  const every = wholeParam(url, "every", { min: 1, max: frames, meaning: "take frames 0, K, 2K, …" });
  const columns = wholeParam(url, "columns", { min: 1, max: frames });
  let layout: SheetLayout;
  try {
    layout = sheetLayout(frames, document.canvas, { zoom, every, columns });
  } catch (error) {
    if (error instanceof SheetError) throw data({ message: error.message }, { status: 400 });
    throw error;
  }
  const { source, tag } = await effectSource(db(), effect, document);
  const name = `${fileSlug(effect.name, "effect")}-frames${layout.every > 1 ? `-every-${layout.every}` : ""}${pass === 3 ? "" : `-pass-${pass}`}${zoom && zoom > 1 ? `-x${zoom}` : ""}.png`;
  const response = pngResponse(request, `${tag}.sheet.${pass}.${layout.zoom}.${layout.every}.${layout.columns}`, name, () =>
    contactSheet(document, source, pass, layout),
  );
  // Say what the grid holds, for a script that cuts it up again.
  response.headers.set(
    "X-Sheet-Layout",
    `frames=${layout.frames.length}; every=${layout.every}; columns=${layout.columns}; rows=${layout.rows}`,
  );
  return response;
}
