import { and, desc, eq } from "drizzle-orm";
import type { Tx } from "../db/client.server.ts";
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

/** The latest activity of a team, or of one project when `projectId` is given, newest first. */
export async function listActivity(db: Tx, where: { teamId: string; projectId?: string }, limit = 20): Promise<ActivityItem[]> {
  const rows = await db
    .select({
      id: activity.id,
      action: activity.action,
      summary: activity.summary,
      createdAt: activity.createdAt,
      name: users.name,
      login: users.login,
    })
    .from(activity)
    .leftJoin(users, eq(users.id, activity.userId))
    .where(
      where.projectId ? and(eq(activity.teamId, where.teamId), eq(activity.projectId, where.projectId)) : eq(activity.teamId, where.teamId),
    )
    .orderBy(desc(activity.createdAt), desc(activity.id))
    .limit(limit);
  return rows.map((r) => ({
    id: r.id,
    action: r.action,
    summary: r.summary,
    createdAt: r.createdAt,
    who: r.name ?? r.login ?? null,
  }));
}
