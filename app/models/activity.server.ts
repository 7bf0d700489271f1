import { and, count, desc, eq, isNull, or, sql, type SQL } from "drizzle-orm";
import type { Tx } from "../db/client.server.ts";
import { KIND_PREFIXES, type ActivityKind } from "./activityKinds.ts";
import { activity, users } from "../db/schema.ts";

/** Records who did what (one row, inside the caller's transaction when given one). */
export async function recordActivity(
  db: Tx,
  entry: { teamId: string; projectId?: string | null; userId: string | null; action: string; summary: string },
): Promise<void> {
  await db.insert(activity).values({
    teamId: entry.teamId,
    projectId: entry.projectId ?? null,
    userId: entry.userId,
    action: entry.action,
    summary: entry.summary,
  });
}

export interface ActivityItem {
  id: number;
  action: string;
  summary: string;
  createdAt: Date;
  who: string | null;
}

/** The columns of an activity row as lists show it: the row and the name of who did it. */
const ITEM_COLUMNS = {
  id: activity.id,
  action: activity.action,
  summary: activity.summary,
  createdAt: activity.createdAt,
  name: users.name,
  login: users.login,
};

function toItem(r: {
  id: number;
  action: string;
  summary: string;
  createdAt: Date;
  name: string | null;
  login: string | null;
}): ActivityItem {
  return { id: r.id, action: r.action, summary: r.summary, createdAt: r.createdAt, who: r.name ?? r.login ?? null };
}

/** The latest activity of a team, or of one project when `projectId` is given, newest first. */
export async function listActivity(db: Tx, where: { teamId: string; projectId?: string }, limit = 20): Promise<ActivityItem[]> {
  const rows = await db
    .select(ITEM_COLUMNS)
    .from(activity)
    .leftJoin(users, eq(users.id, activity.userId))
    .where(
      where.projectId ? and(eq(activity.teamId, where.teamId), eq(activity.projectId, where.projectId)) : eq(activity.teamId, where.teamId),
    )
    .orderBy(desc(activity.createdAt), desc(activity.id))
    .limit(limit);
  return rows.map(toItem);
}

export { ACTIVITY_KINDS, isActivityKind, type ActivityKind } from "./activityKinds.ts";

/** Rows per page of a full activity list. */
export const ACTIVITY_PAGE_SIZE = 25;

export interface ActivityPage {
  items: ActivityItem[];
  page: number;
  pages: number;
  total: number;
}

/**
 * One page (1-based) of what happened in a project: its own changes and the team-wide ones (members,
 * invitations, target profiles, tokens) that concern every project of the team, newest first, optionally of one kind.
 */
export async function listProjectActivityPage(
  db: Tx,
  where: { teamId: string; projectId: string; kind?: ActivityKind },
  page: number,
  pageSize = ACTIVITY_PAGE_SIZE,
): Promise<ActivityPage> {
  const conditions: SQL[] = [eq(activity.teamId, where.teamId), or(eq(activity.projectId, where.projectId), isNull(activity.projectId))!];
  if (where.kind) {
    const prefixes = KIND_PREFIXES.get(where.kind) ?? [];
    conditions.push(or(...prefixes.map((p) => sql`starts_with(${activity.action}, ${p})`))!);
  }
  const filter = and(...conditions);
  // The page and the count of all matching rows in one round trip (a window over the filtered rows); a page past the
  // end has no row to carry the count, and only then is it asked for apart.
  const rows = await db
    .select({ ...ITEM_COLUMNS, total: sql<number>`(count(*) over ())::int` })
    .from(activity)
    .leftJoin(users, eq(users.id, activity.userId))
    .where(filter)
    .orderBy(desc(activity.createdAt), desc(activity.id))
    .limit(pageSize)
    .offset((page - 1) * pageSize);
  const n = rows.length > 0 ? rows[0].total : page === 1 ? 0 : (await db.select({ n: count() }).from(activity).where(filter))[0].n;
  return {
    items: rows.map(toItem),
    page,
    pages: Math.max(1, Math.ceil(n / pageSize)),
    total: n,
  };
}

/** The latest team-wide activity of one kind (say, every change of the team's target profiles), newest first. */
export async function listTeamActivityOfKind(db: Tx, teamId: string, kind: ActivityKind, limit = 10): Promise<ActivityItem[]> {
  const prefixes = KIND_PREFIXES.get(kind) ?? [];
  const rows = await db
    .select(ITEM_COLUMNS)
    .from(activity)
    .leftJoin(users, eq(users.id, activity.userId))
    .where(and(eq(activity.teamId, teamId), or(...prefixes.map((p) => sql`starts_with(${activity.action}, ${p})`))))
    .orderBy(desc(activity.createdAt), desc(activity.id))
    .limit(limit);
  return rows.map(toItem);
}
