import { and, asc, desc, eq, isNotNull, isNull, ne, sql, type SQL } from "drizzle-orm";
import type { Tx } from "../db/client.server.ts";
import { effects, memberships, projects, teams, type Project, type Role } from "../db/schema.ts";
import { recordActivity } from "./activity.server.ts";
import { DomainError, isUniqueViolation, staleVersion } from "./errors.ts";

export const PROJECT_SORTS = ["name", "effects", "changed"] as const;
export type ProjectSort = (typeof PROJECT_SORTS)[number];
export type SortDirection = "asc" | "desc";

const NAME_TAKEN = (name: string) =>
  new DomainError(`The team already has a project called “${name}”. Choose another name.`, { field: "name", status: 409 });

async function assertNameFree(db: Tx, teamId: string, name: string, exceptId?: string): Promise<void> {
  const clash = await db
    .select({ id: projects.id })
    .from(projects)
    .where(
      and(
        eq(projects.teamId, teamId),
        isNull(projects.archivedAt),
        sql`lower(${projects.name}) = lower(${name})`,
        exceptId ? ne(projects.id, exceptId) : undefined,
      ),
    );
  if (clash.length > 0) throw NAME_TAKEN(name);
}

async function guardUnique<T>(name: string, work: () => Promise<T>): Promise<T> {
  try {
    return await work();
  } catch (error) {
    if (isUniqueViolation(error, "projects_team_live_name_key")) throw NAME_TAKEN(name);
    throw error;
  }
}

export async function createProject(
  db: Tx,
  input: { teamId: string; name: string; description?: string; actorId: string | null },
): Promise<Project> {
  return guardUnique(input.name, () =>
    db.transaction(async (tx) => {
      await assertNameFree(tx, input.teamId, input.name);
      const [project] = await tx
        .insert(projects)
        .values({ teamId: input.teamId, name: input.name, description: input.description ?? "", createdBy: input.actorId })
        .returning();
      await recordActivity(tx, {
        teamId: input.teamId,
        projectId: project.id,
        userId: input.actorId,
        action: "project.created",
        summary: `created the project ${input.name}`,
      });
      return project;
    }),
  );
}

export async function getProject(db: Tx, projectId: string): Promise<Project | null> {
  const [project] = await db.select().from(projects).where(eq(projects.id, projectId));
  return project ?? null;
}

/** The project, or a 404 DomainError when there is none. */
export async function mustGetProject(db: Tx, projectId: string): Promise<Project> {
  const project = await getProject(db, projectId);
  if (!project) throw new DomainError("That project does not exist.", { status: 404 });
  return project;
}

/** Renames a project and sets its description, if nobody changed them since `expectedVersion`; the version goes up by one. */
export async function updateProject(
  db: Tx,
  input: { projectId: string; name: string; description: string; expectedVersion: number; actorId: string },
): Promise<Project> {
  return guardUnique(input.name, () =>
    db.transaction(async (tx) => {
      const before = await mustGetProject(tx, input.projectId);
      if (before.archivedAt) throw new DomainError("Restore the project before changing it.", { status: 409 });
      if (before.version !== input.expectedVersion) throw staleVersion("project", before, input.expectedVersion);
      if (before.name === input.name && before.description === input.description) return before;
      await assertNameFree(tx, before.teamId, input.name, before.id);
      const [after] = await tx
        .update(projects)
        .set({ name: input.name, description: input.description, version: sql`${projects.version} + 1` })
        .where(and(eq(projects.id, input.projectId), eq(projects.version, input.expectedVersion)))
        .returning();
      if (!after) throw staleVersion("project", (await getProject(tx, input.projectId)) ?? before, input.expectedVersion);
      const renamed = before.name !== input.name;
      const described = before.description !== input.description;
      const summary = renamed
        ? `renamed the project ${before.name} to ${input.name}${described ? " and changed its description" : ""}`
        : `changed the description of ${input.name}`;
      await recordActivity(tx, {
        teamId: before.teamId,
        projectId: before.id,
        userId: input.actorId,
        action: renamed ? "project.renamed" : "project.described",
        summary,
      });
      return after;
    }),
  );
}

/** Archives a project: it leaves the team's list but keeps everything, and can be restored. */
export async function archiveProject(db: Tx, input: { projectId: string; actorId: string }): Promise<void> {
  await db.transaction(async (tx) => {
    const project = await mustGetProject(tx, input.projectId);
    if (project.archivedAt) return;
    await tx.update(projects).set({ archivedAt: new Date() }).where(eq(projects.id, project.id));
    await recordActivity(tx, {
      teamId: project.teamId,
      projectId: project.id,
      userId: input.actorId,
      action: "project.archived",
      summary: `archived the project ${project.name}`,
    });
  });
}

/** Brings an archived project back; refused while another live project has its name. */
export async function restoreProject(db: Tx, input: { projectId: string; actorId: string }): Promise<void> {
  const project = await mustGetProject(db, input.projectId);
  await guardUnique(project.name, () =>
    db.transaction(async (tx) => {
      if (!project.archivedAt) return;
      try {
        await assertNameFree(tx, project.teamId, project.name, project.id);
      } catch {
        throw new DomainError(`Another project is now called “${project.name}”. Rename that one first, then restore this one.`, {
          status: 409,
        });
      }
      await tx.update(projects).set({ archivedAt: null }).where(eq(projects.id, project.id));
      await recordActivity(tx, {
        teamId: project.teamId,
        projectId: project.id,
        userId: input.actorId,
        action: "project.restored",
        summary: `restored the project ${project.name}`,
      });
    }),
  );
}

export interface ProjectListItem {
  id: string;
  teamId: string;
  name: string;
  description: string;
  effectCount: number;
  lastChangedAt: Date;
  archivedAt: Date | null;
}

// Correlated subqueries name the outer table in full: Drizzle prints a bare column name when a query reads one
// table, and inside the subquery that bare name would bind to the inner table instead.
const effectCount = sql<number>`(select count(*)::int from ${effects} e where e.project_id = "projects"."id" and e.deleted_at is null)`;
/** The latest change to the project or any of its effects (deleting an effect counts). */
const lastChangedAt =
  sql<Date>`greatest("projects"."updated_at", (select max(e.updated_at) from ${effects} e where e.project_id = "projects"."id"))`.mapWith(
    (v: string | Date) => new Date(v),
  );

/** The columns of a ProjectListItem, for every query that lists projects. */
const listColumns = {
  id: projects.id,
  teamId: projects.teamId,
  name: projects.name,
  description: projects.description,
  effectCount,
  lastChangedAt,
  archivedAt: projects.archivedAt,
};

function orderFor(sort: ProjectSort, dir: SortDirection): SQL[] {
  const by = dir === "desc" ? desc : asc;
  const name = sql`lower(${projects.name})`;
  switch (sort) {
    case "effects":
      return [by(effectCount), asc(name)];
    case "changed":
      return [by(lastChangedAt), asc(name)];
    default:
      return [by(name)];
  }
}

/** A team's projects, live or archived, with effect counts and last change, sorted as asked. */
export async function listProjects(
  db: Tx,
  teamId: string,
  options: { archived?: boolean; sort?: ProjectSort; dir?: SortDirection } = {},
): Promise<ProjectListItem[]> {
  return db
    .select(listColumns)
    .from(projects)
    .where(and(eq(projects.teamId, teamId), options.archived ? isNotNull(projects.archivedAt) : isNull(projects.archivedAt)))
    .orderBy(...orderFor(options.sort ?? "name", options.dir ?? "asc"));
}

export interface ProjectOfUser extends ProjectListItem {
  teamName: string;
  role: Role;
}

/** The live projects of every team a person belongs to, most recently changed first. */
export async function listProjectsForUser(db: Tx, userId: string): Promise<ProjectOfUser[]> {
  return db
    .select({
      ...listColumns,
      teamName: teams.name,
      role: memberships.role,
    })
    .from(projects)
    .innerJoin(teams, eq(teams.id, projects.teamId))
    .innerJoin(memberships, and(eq(memberships.teamId, projects.teamId), eq(memberships.userId, userId)))
    .where(isNull(projects.archivedAt))
    .orderBy(desc(lastChangedAt), asc(sql`lower(${projects.name})`));
}
