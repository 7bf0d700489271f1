/**
 * What the effect page reads besides its guard, in one round trip: the team's target profiles (the fields the bench
 * uses), the project's sprites with their uses, who saved the effect last and the last profile change that reached
 * it. Each is what its own function answers (listTargetProfiles, listSprites, getEffectChanges; the tests compare
 * them); the page asked them as three queries at once, which cost three pool turns, three writes to PostgreSQL and
 * three backends woken for every page.
 */
import { eq, sql } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import { preparedOnce, type Tx } from "../db/client.server.ts";
import { effectProfileChanges, effects, users, type TargetProfile } from "../db/schema.ts";
import type { SpriteListItem, SpriteUse } from "./sprites.server.ts";
import { effectChangeColumns, effectChangesOf, type ProfileChangeView } from "./effectChanges.server.ts";

/** A target profile as the bench uses it (settings and export defaults). */
export type EffectPageProfile = Pick<
  TargetProfile,
  | "id"
  | "name"
  | "canvasWidth"
  | "canvasHeight"
  | "fixedPointBits"
  | "fixedPointFraction"
  | "rounding"
  | "halfTurn"
  | "edges"
  | "columnGroup"
  | "dialects"
  | "labelPrefix"
  | "exportOptions"
>;

export interface EffectPageLists {
  /** The team's target profiles, by name (as listTargetProfiles orders them). */
  profiles: EffectPageProfile[];
  /** The project's sprites, by name, with the effects that use them (as listSprites gives them). */
  sprites: SpriteListItem[];
  updatedBy: { name: string | null; login: string } | null;
  profileChange: ProfileChangeView | null;
}

type SpriteJson = Omit<SpriteListItem, "colours" | "createdAt" | "updatedAt"> & { createdAt: number; updatedAt: number };

/** Milliseconds since 1970 of a timestamp, truncated as the driver truncates a timestamp it reads into a Date. */
export const epochMs = (column: string) => sql.raw(`floor(extract(epoch from ${column}) * 1000)::float8`);

/** The sprites of the project named by placeholder `projectId`, as JSON (read back by spritesFromJson). */
export function projectSpritesJson() {
  return sql<SpriteJson[]>`coalesce((
      select json_agg(json_build_object(
        'id', s.id, 'name', s.name, 'kind', s.kind, 'width', s.width, 'height', s.height, 'palette', s.palette,
        'byteSize', s.byte_size, 'version', s.version, 'uploadedByName', coalesce(u.name, u.login),
        'createdAt', ${epochMs("s.created_at")}, 'updatedAt', ${epochMs("s.updated_at")},
        'usedBy', coalesce((
          select json_agg(json_build_object('id', e.id, 'name', e.name, 'deleted', e.deleted_at is not null) order by lower(e.name), e.id)
          from effects e where e.sprite_id = s.id), '[]'::json)
      ) order by lower(s.name))
      from sprites s left join users u on u.id = s.uploaded_by
      where s.project_id = ${sql.placeholder("projectId")}), '[]'::json)`;
}

/** The sprites of projectSpritesJson as listSprites gives them. */
export function spritesFromJson(sprites: SpriteJson[]): SpriteListItem[] {
  return sprites.map((s) => ({
    ...s,
    usedBy: s.usedBy as SpriteUse[],
    colours: s.palette.length,
    createdAt: new Date(s.createdAt),
    updatedAt: new Date(s.updatedAt),
  }));
}

/** The effect page's lists for effect `effectId` of project `projectId` in team `teamId`; empty lists when it is gone. */
export async function getEffectPageLists(db: Tx, ids: { teamId: string; projectId: string; effectId: string }): Promise<EffectPageLists> {
  const query = preparedOnce(db, "skewsmith_effect_page_lists", (d) => {
    const updater = alias(users, "updater");
    const profiles = sql<EffectPageProfile[]>`coalesce((
      select json_agg(json_build_object(
        'id', tp.id, 'name', tp.name, 'canvasWidth', tp.canvas_width, 'canvasHeight', tp.canvas_height,
        'fixedPointBits', tp.fixed_point_bits, 'fixedPointFraction', tp.fixed_point_fraction, 'rounding', tp.rounding,
        'halfTurn', tp.half_turn, 'edges', tp.edges, 'columnGroup', tp.column_group, 'dialects', tp.dialects,
        'labelPrefix', tp.label_prefix, 'exportOptions', tp.export_options
      ) order by lower(tp.name))
      from target_profiles tp where tp.team_id = ${sql.placeholder("teamId")}), '[]'::json)`;
    const sprites = projectSpritesJson();
    return d
      .select({
        ...effectChangeColumns(updater),
        profiles,
        sprites,
      })
      .from(effects)
      .leftJoin(updater, eq(updater.id, effects.updatedBy))
      .leftJoin(effectProfileChanges, eq(effectProfileChanges.effectId, effects.id))
      .leftJoin(users, eq(users.id, effectProfileChanges.changedBy))
      .where(eq(effects.id, sql.placeholder("effectId")))
      .prepare("skewsmith_effect_page_lists");
  });
  const [row] = await query.execute(ids);
  if (!row) return { profiles: [], sprites: [], updatedBy: null, profileChange: null };
  const { profiles, sprites, ...changeRow } = row;
  return { profiles, sprites: spritesFromJson(sprites), ...effectChangesOf(changeRow) };
}
