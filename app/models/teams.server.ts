import { and, asc, count, eq, sql } from "drizzle-orm";
import type { Tx } from "../db/client.server.ts";
import { memberships, projects, teams, users, type Role, type Team, type User } from "../db/schema.ts";
import { recordActivity } from "./activity.server.ts";
import { DomainError, isUniqueViolation, staleVersion } from "./errors.ts";
import { displayName } from "./users.server.ts";

/** A URL-safe handle from a name: lower-case letters, digits and single dashes. */
export function slugify(name: string): string {
  const slug = name
    .normalize("NFKD")
    .replace(/[\u0300-\u036f]/g, "")
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, "-")
    .replace(/^-+|-+$/g, "")
    .slice(0, 48)
    .replace(/-+$/g, "");
  return slug || "team";
}

/** Creates a team with its creator as the only member, an owner. */
export async function createTeam(db: Tx, input: { name: string; ownerId: string; slug?: string }): Promise<Team> {
  const base = input.slug ?? slugify(input.name);
  return db.transaction(async (tx) => {
    // Teams of one name are made one at a time (a lock on the handle's stem), so two made at the same moment get
    // base and base-2 rather than one of them a clash.
    await tx.execute(sql`select pg_advisory_xact_lock(hashtext(${`skewsmith.team-slug:${base}`}))`);
    // Pick the first free handle: base, base-2, base-3…
    const taken = await tx
      .select({ slug: teams.slug })
      .from(teams)
      .where(sql`${teams.slug} = ${base} or ${teams.slug} like ${`${base}-%`}`);
    const used = new Set(taken.map((t) => t.slug));
    let slug = base;
    for (let n = 2; used.has(slug); n++) slug = `${base}-${n}`;
    let team: Team;
    try {
      [team] = await tx.insert(teams).values({ name: input.name, slug }).returning();
    } catch (error) {
      if (isUniqueViolation(error))
        throw new DomainError("Another team was just created with this name; try again.", { field: "name", status: 409 });
      throw error;
    }
    await tx.insert(memberships).values({ teamId: team.id, userId: input.ownerId, role: "owner" });
    await recordActivity(tx, { teamId: team.id, userId: input.ownerId, action: "team.created", summary: `created the team ${input.name}` });
    return team;
  });
}

export async function getTeam(db: Tx, teamId: string): Promise<Team | null> {
  const [team] = await db.select().from(teams).where(eq(teams.id, teamId));
  return team ?? null;
}

/** The person's role in the team, or null when they are not a member. */
export async function getRole(db: Tx, teamId: string, userId: string): Promise<Role | null> {
  const [row] = await db
    .select({ role: memberships.role })
    .from(memberships)
    .where(and(eq(memberships.teamId, teamId), eq(memberships.userId, userId)));
  return row?.role ?? null;
}

export interface TeamOfUser {
  id: string;
  name: string;
  slug: string;
  role: Role;
  memberCount: number;
  projectCount: number;
}

/** The teams a person belongs to, with their role and the team's size, by name. */
export async function listTeamsForUser(db: Tx, userId: string): Promise<TeamOfUser[]> {
  const memberCount = sql<number>`(select count(*)::int from ${memberships} m where m.team_id = "teams"."id")`;
  const projectCount = sql<number>`(select count(*)::int from ${projects} p where p.team_id = "teams"."id" and p.archived_at is null)`;
  return db
    .select({ id: teams.id, name: teams.name, slug: teams.slug, role: memberships.role, memberCount, projectCount })
    .from(memberships)
    .innerJoin(teams, eq(teams.id, memberships.teamId))
    .where(eq(memberships.userId, userId))
    .orderBy(asc(sql`lower(${teams.name})`));
}

export interface Member {
  userId: string;
  login: string;
  name: string | null;
  email: string | null;
  role: Role;
  joinedAt: Date;
}

const ROLE_ORDER = sql`case ${memberships.role} when 'owner' then 0 when 'editor' then 1 else 2 end`;

/** A team's members, owners first, then by name. */
export async function listMembers(db: Tx, teamId: string): Promise<Member[]> {
  return db
    .select({
      userId: users.id,
      login: users.login,
      name: users.name,
      email: users.email,
      role: memberships.role,
      joinedAt: memberships.createdAt,
    })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.teamId, teamId))
    .orderBy(ROLE_ORDER, asc(sql`lower(coalesce(${users.name}, ${users.login}))`));
}

/** Adds a person to a team with a role (the seed and, later, accepted invitations). */
export async function addMember(db: Tx, input: { teamId: string; userId: string; role: Role; actorId: string | null }): Promise<void> {
  await db.transaction(async (tx) => {
    const inserted = await tx
      .insert(memberships)
      .values({ teamId: input.teamId, userId: input.userId, role: input.role })
      .onConflictDoNothing()
      .returning();
    if (inserted.length === 0) throw new DomainError("That person is already a member of this team.", { status: 409 });
    const [user] = await tx.select().from(users).where(eq(users.id, input.userId));
    await recordActivity(tx, {
      teamId: input.teamId,
      userId: input.actorId,
      action: "member.added",
      summary: `added ${displayName(user)} as ${input.role}`,
    });
  });
}

/**
 * Locks the team's memberships for the rest of the transaction and returns them, so that two owners
 * demoting each other at the same moment cannot leave a team with no owner.
 */
async function lockMembers(tx: Tx, teamId: string) {
  return tx
    .select({ userId: memberships.userId, role: memberships.role })
    .from(memberships)
    .where(eq(memberships.teamId, teamId))
    .for("update");
}

/** A role change that happened: whose, from what, to what. */
export interface RoleChange {
  user: User;
  from: Role;
  to: Role;
}

/** Changes a member's role; a team always keeps at least one owner. Returns the change, or null when the role was already that. */
export async function changeRole(
  db: Tx,
  input: { teamId: string; userId: string; role: Role; actorId: string },
): Promise<RoleChange | null> {
  return db.transaction(async (tx) => {
    const members = await lockMembers(tx, input.teamId);
    const member = members.find((m) => m.userId === input.userId);
    if (!member) throw new DomainError("That person is not a member of this team.", { status: 404 });
    if (member.role === input.role) return null;
    const owners = members.filter((m) => m.role === "owner").length;
    if (member.role === "owner" && owners === 1)
      throw new DomainError("A team needs at least one owner: make someone else an owner first.", { field: "role", status: 409 });
    await tx
      .update(memberships)
      .set({ role: input.role })
      .where(and(eq(memberships.teamId, input.teamId), eq(memberships.userId, input.userId)));
    const [user] = await tx.select().from(users).where(eq(users.id, input.userId));
    await recordActivity(tx, {
      teamId: input.teamId,
      userId: input.actorId,
      action: "member.role_changed",
      summary: `made ${displayName(user)} ${input.role === "owner" ? "an owner" : `an ${input.role}`}`,
    });
    return { user, from: member.role, to: input.role };
  });
}

/** Removes a member (or lets a member leave, when actor and member are the same); the last owner stays. Returns who left and their role. */
export async function removeMember(
  db: Tx,
  input: { teamId: string; userId: string; actorId: string },
): Promise<{ user: User; role: Role }> {
  return db.transaction(async (tx) => {
    const members = await lockMembers(tx, input.teamId);
    const member = members.find((m) => m.userId === input.userId);
    if (!member) throw new DomainError("That person is not a member of this team.", { status: 404 });
    const owners = members.filter((m) => m.role === "owner").length;
    if (member.role === "owner" && owners === 1)
      throw new DomainError(
        input.userId === input.actorId
          ? "You are the team's only owner: make someone else an owner before you leave."
          : "A team needs at least one owner: make someone else an owner first.",
        { status: 409 },
      );
    await tx.delete(memberships).where(and(eq(memberships.teamId, input.teamId), eq(memberships.userId, input.userId)));
    const [user] = await tx.select().from(users).where(eq(users.id, input.userId));
    await recordActivity(tx, {
      teamId: input.teamId,
      userId: input.actorId,
      action: input.userId === input.actorId ? "member.left" : "member.removed",
      summary: input.userId === input.actorId ? "left the team" : `removed ${displayName(user)} from the team`,
    });
    return { user, role: member.role };
  });
}

/** Renames a team (its handle stays), if nobody changed it since `expectedVersion`; the version goes up by one. */
export async function renameTeam(db: Tx, input: { teamId: string; name: string; expectedVersion: number; actorId: string }): Promise<Team> {
  return db.transaction(async (tx) => {
    const [before] = await tx.select().from(teams).where(eq(teams.id, input.teamId));
    if (!before) throw new DomainError("That team does not exist.", { status: 404 });
    if (before.version !== input.expectedVersion) throw staleVersion("team", before, input.expectedVersion, "name");
    if (before.name === input.name) return before;
    // The version in the WHERE is what makes two renames from one version exclusive: the second finds no row.
    const [after] = await tx
      .update(teams)
      .set({ name: input.name, version: sql`${teams.version} + 1` })
      .where(and(eq(teams.id, input.teamId), eq(teams.version, input.expectedVersion)))
      .returning();
    if (!after) {
      const [now] = await tx.select().from(teams).where(eq(teams.id, input.teamId));
      throw staleVersion("team", now ?? before, input.expectedVersion, "name");
    }
    await recordActivity(tx, {
      teamId: input.teamId,
      userId: input.actorId,
      action: "team.renamed",
      summary: `renamed the team from ${before.name} to ${input.name}`,
    });
    return after;
  });
}

/** Number of owners of a team. */
export async function ownerCount(db: Tx, teamId: string): Promise<number> {
  const [row] = await db
    .select({ n: count() })
    .from(memberships)
    .where(and(eq(memberships.teamId, teamId), eq(memberships.role, "owner")));
  return row.n;
}
