/**
 * What the project page reads besides its guard and its effects, in one round trip: the team's target profiles with
 * the project's live effects on each, the project's sprites with their uses, and the first page of its activity with
 * the count of all of it. Each is what its own function answers (listTargetProfiles, listSprites,
 * listProjectActivityPage; the tests compare them); the page asked them as three queries at once.
 */
import { eq, sql } from "drizzle-orm";
import { preparedOnce, type Tx } from "../db/client.server.ts";
import { projects } from "../db/schema.ts";
import type { ActivityItem } from "./activity.server.ts";
import { epochMs, projectSpritesJson, spritesFromJson } from "./effectPage.server.ts";
import type { SpriteListItem } from "./sprites.server.ts";
import type { TargetProfileListItem } from "./targetProfiles.server.ts";

export interface ProjectPageLists {
  /** The team's target profiles, by name, each with the project's live effects on it (as listTargetProfiles). */
  profiles: TargetProfileListItem[];
  /** The project's sprites, by name, with the effects that use them (as listSprites). */
  sprites: SpriteListItem[];
  /** The newest `activityLimit` items of the project's activity (its own and the team-wide), newest first. */
  activity: ActivityItem[];
  /** How many activity items there are in all. */
  activityTotal: number;
}

type Stamped<T> = Omit<T, "createdAt" | "updatedAt"> & { createdAt: number; updatedAt: number };

/** The project page's lists for project `projectId` of team `teamId`; empty when the project is gone. */
export async function getProjectPageLists(
  db: Tx,
  ids: { teamId: string; projectId: string },
  activityLimit: number,
): Promise<ProjectPageLists> {
  const query = preparedOnce(db, "skewsmith_project_page_lists", (d) => {
    const teamId = sql.placeholder("teamId");
    const projectId = sql.placeholder("projectId");
    const profiles = sql<Stamped<TargetProfileListItem>[]>`coalesce((
      select json_agg(json_build_object(
        'id', tp.id, 'teamId', tp.team_id, 'name', tp.name, 'description', tp.description,
        'canvasWidth', tp.canvas_width, 'canvasHeight', tp.canvas_height, 'fixedPointBits', tp.fixed_point_bits,
        'fixedPointFraction', tp.fixed_point_fraction, 'rounding', tp.rounding, 'halfTurn', tp.half_turn,
        'edges', tp.edges, 'columnGroup', tp.column_group, 'dialects', tp.dialects, 'labelPrefix', tp.label_prefix,
        'maxColours', tp.max_colours, 'exportOptions', tp.export_options, 'version', tp.version,
        'createdAt', ${epochMs("tp.created_at")}, 'updatedAt', ${epochMs("tp.updated_at")},
        'effectCount', (select count(*)::int from effects e
          where e.target_profile_id = tp.id and e.deleted_at is null and e.project_id = ${projectId})
      ) order by lower(tp.name))
      from target_profiles tp where tp.team_id = ${teamId}), '[]'::json)`;
    const mine = sql`a.team_id = ${teamId} and (a.project_id = ${projectId} or a.project_id is null)`;
    const activity = sql<(Omit<ActivityItem, "createdAt"> & { createdAt: number })[]>`coalesce((
      select json_agg(json_build_object('id', a.id, 'action', a.action, 'summary', a.summary,
        'createdAt', ${epochMs("a.created_at")}, 'who', a.who) order by a.created_at desc, a.id desc)
      from (select a.id, a.action, a.summary, a.created_at, coalesce(u.name, u.login) as who
        from activity a left join users u on u.id = a.user_id
        where ${mine} order by a.created_at desc, a.id desc limit ${sql.placeholder("activityLimit")}) a), '[]'::json)`;
    const activityTotal = sql<number>`(select count(*)::int from activity a where ${mine})`;
    return d
      .select({ profiles, sprites: projectSpritesJson(), activity, activityTotal })
      .from(projects)
      .where(eq(projects.id, projectId))
      .prepare("skewsmith_project_page_lists");
  });
  const [row] = await query.execute({ ...ids, activityLimit });
  if (!row) return { profiles: [], sprites: [], activity: [], activityTotal: 0 };
  return {
    profiles: row.profiles.map((p) => ({ ...p, createdAt: new Date(p.createdAt), updatedAt: new Date(p.updatedAt) })),
    sprites: spritesFromJson(row.sprites),
    activity: row.activity.map((a) => ({ ...a, createdAt: new Date(a.createdAt) })),
    activityTotal: row.activityTotal,
  };
}
