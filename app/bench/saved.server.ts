/** The saved effect as the bench loads it, and its diagnostics computed on the server by the same modules as the worker (source.ts, trackDiagnosis.ts). */
import { decodePng } from "@skewsmith/core";
import type { Tx } from "../db/client.server.ts";
import type { EffectRow } from "../db/schema.ts";
import { validDocument } from "../models/effects.server.ts";
import { getSpriteFile, getSpriteVersion } from "../models/sprites.server.ts";
import type { BenchState } from "./draft.ts";
import { prepareSource } from "./source.ts";
import { diagnosisCost, TrackDiagnosis, type FrameRow } from "./trackDiagnosis.ts";

/** Most pixels × frames the server measures for a page or a JSON answer (about a second of work); beyond it the browser does. */
export const SERVER_DIAGNOSIS_MAX = 64 * 1024 * 1024;

/** The bench's state of a saved effect row. */
export function benchState(row: EffectRow): BenchState {
  return {
    document: validDocument(row.document),
    targetProfileId: row.targetProfileId,
    followsProfile: row.targetProfileId !== null && row.followsProfile,
    spriteId: row.spriteId,
    spriteX: row.spriteX,
    spriteY: row.spriteY,
    keyPixels: row.keyPixels.map(([x, y]) => [x, y]),
  };
}

/** The per-frame diagnostics of the saved effect, or why there are none. */
export interface SavedDiagnostics {
  version: number;
  rows: FrameRow[] | null;
  /** Pixels measured per frame: the sprite's opaque ones, or the whole canvas. */
  content: number;
  masked: boolean;
  /** Set when the track is too large to measure on the server; the page measures it in the browser. */
  tooLarge: boolean;
}

/**
 * Answers already measured, by everything they depend on: the effect's id and version, its bench state and its
 * sprite's version (a replaced picture bumps it). The oldest goes first beyond CACHE_MAX; an answer is never changed
 * once made, so requests share it. Measuring was most of what an effect page cost the server.
 */
const cache = new Map<string, SavedDiagnostics>();
const CACHE_MAX = 32;

/**
 * Measures the saved effect over its sprite's opaque pixels and its key pixels, as the bench's worker does.
 * `known.spriteVersion` is the sprite's version when the caller has just read it (the effect page lists the project's
 * sprites), saving a query; it must have been read before this call. `known.state` is `benchState(row)` when the caller
 * has made it already (reading the document again costs a validation).
 */
export async function savedDiagnostics(
  db: Tx,
  row: EffectRow,
  known: { spriteVersion?: number; state?: BenchState } = {},
): Promise<SavedDiagnostics> {
  const state = known.state ?? benchState(row);
  // The version is read before the picture: a replacement in between is measured under the older key, never the reverse.
  const spriteVersion = state.spriteId ? (known.spriteVersion ?? (await getSpriteVersion(db, state.spriteId))) : null;
  const key = JSON.stringify([row.id, row.version, state, spriteVersion]);
  const hit = cache.get(key);
  if (hit) {
    cache.delete(key);
    cache.set(key, hit);
    return hit;
  }
  const file = state.spriteId ? await getSpriteFile(db, state.spriteId) : null;
  const sprite = file ? decodePng(new Uint8Array(file.png)) : null;
  const source = prepareSource(state.document, sprite, state.spriteX, state.spriteY, state.keyPixels);
  const base = { version: row.version, content: source.content, masked: source.mask !== null };
  const answer: SavedDiagnostics =
    diagnosisCost(state.document) > SERVER_DIAGNOSIS_MAX
      ? { ...base, rows: null, tooLarge: true }
      : { ...base, rows: new TrackDiagnosis(state.document, source).all(), tooLarge: false };
  cache.set(key, answer);
  for (const old of cache.keys()) {
    if (cache.size <= CACHE_MAX) break;
    cache.delete(old);
  }
  return answer;
}
