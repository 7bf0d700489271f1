/**
 * Invitations by e-mail: an owner invites an address with a role; the mailed link carries a random token whose
 * SHA-256 alone is stored; the link works once, for INVITATION_DAYS days, until it is revoked or replaced by a resend.
 * Sending the mail is the caller's job (app/mail/team.server.ts), after these changes have committed.
 */
import { createHash, randomBytes } from "node:crypto";
import { and, asc, eq, isNull, sql } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import type { Tx } from "../db/client.server.ts";
import { invitations, memberships, teams, users, type Invitation, type Role } from "../db/schema.ts";
import { recordActivity } from "./activity.server.ts";
import { DomainError, isUniqueViolation } from "./errors.ts";
import { displayName } from "./users.server.ts";

/** How long an invitation link works, in days. */
export const INVITATION_DAYS = 7;
const INVITATION_MS = INVITATION_DAYS * 24 * 60 * 60 * 1000;

/** A token as mailed: 32 random bytes in base64url (43 characters). */
const TOKEN_FORM = /^[A-Za-z0-9_-]{43}$/;

export type InvitationStatus = "pending" | "expired" | "accepted" | "revoked";

/** Where an invitation stands: used, revoked, expired (at `now`), or still usable. */
export function invitationStatus(
  invitation: Pick<Invitation, "acceptedAt" | "revokedAt" | "expiresAt">,
  now = new Date(),
): InvitationStatus {
  if (invitation.acceptedAt) return "accepted";
  if (invitation.revokedAt) return "revoked";
  if (invitation.expiresAt.getTime() <= now.getTime()) return "expired";
  return "pending";
}

/** The SHA-256 of a token, as stored. */
export function hashInvitationToken(token: string): string {
  return createHash("sha256").update(token).digest("hex");
}

function newToken(): { token: string; tokenHash: string; expiresAt: Date } {
  const token = randomBytes(32).toString("base64url");
  return { token, tokenHash: hashInvitationToken(token), expiresAt: new Date(Date.now() + INVITATION_MS) };
}

const article = (role: Role) => (role === "owner" ? "an owner" : `an ${role}`);

/** What a new or refreshed invitation gives the caller: the row and the token to mail (never stored). */
export interface IssuedInvitation {
  invitation: Invitation;
  token: string;
  /** True when the address already had an open invitation, which now has a new link, role and expiry. */
  refreshed: boolean;
}

/**
 * Invites an address to a team with a role. An address that already has an open invitation gets that one
 * refreshed (new token and expiry, the role given now), so there is only ever one live link per address; an
 * address of a current member is refused.
 */
export async function createInvitation(
  db: Tx,
  input: { teamId: string; email: string; role: Role; actorId: string },
): Promise<IssuedInvitation> {
  const email = input.email.trim();
  try {
    return await db.transaction(async (tx) => {
      const [member] = await tx
        .select({ login: users.login, name: users.name })
        .from(memberships)
        .innerJoin(users, eq(users.id, memberships.userId))
        .where(and(eq(memberships.teamId, input.teamId), sql`lower(${users.email}) = lower(${email})`));
      if (member)
        throw new DomainError(`${displayName(member)} (@${member.login}) is already a member with the address ${email}.`, {
          field: "email",
          status: 409,
        });
      const fresh = newToken();
      const [open] = await tx
        .select()
        .from(invitations)
        .where(
          and(
            eq(invitations.teamId, input.teamId),
            sql`lower(${invitations.email}) = lower(${email})`,
            isNull(invitations.acceptedAt),
            isNull(invitations.revokedAt),
          ),
        )
        .for("update");
      let invitation: Invitation;
      if (open) {
        [invitation] = await tx
          .update(invitations)
          .set({
            role: input.role,
            tokenHash: fresh.tokenHash,
            expiresAt: fresh.expiresAt,
            lastSentAt: null,
            invitedBy: input.actorId,
          })
          .where(eq(invitations.id, open.id))
          .returning();
      } else {
        [invitation] = await tx
          .insert(invitations)
          .values({
            teamId: input.teamId,
            email,
            role: input.role,
            tokenHash: fresh.tokenHash,
            expiresAt: fresh.expiresAt,
            invitedBy: input.actorId,
          })
          .returning();
      }
      await recordActivity(tx, {
        teamId: input.teamId,
        userId: input.actorId,
        action: open ? "invitation.renewed" : "invitation.created",
        summary: `${open ? "invited again" : "invited"} ${email} as ${article(input.role)}`,
      });
      return { invitation, token: fresh.token, refreshed: Boolean(open) };
    });
  } catch (error) {
    if (isUniqueViolation(error, "invitations_team_open_email_key"))
      throw new DomainError(`Someone invited ${email} at the same moment; reload to see that invitation.`, { field: "email", status: 409 });
    throw error;
  }
}

async function lockTeamInvitation(tx: Tx, teamId: string, invitationId: string): Promise<Invitation> {
  const [invitation] = await tx
    .select()
    .from(invitations)
    .where(and(eq(invitations.id, invitationId), eq(invitations.teamId, teamId)))
    .for("update");
  if (!invitation) throw new DomainError("That invitation does not exist in this team.", { status: 404 });
  return invitation;
}

/** Records that the e-mail with the invitation's current link went out. */
export async function markInvitationSent(db: Tx, invitationId: string, at = new Date()): Promise<void> {
  await db.update(invitations).set({ lastSentAt: at }).where(eq(invitations.id, invitationId));
}

/** Gives an open invitation a new link and a new expiry (the old link stops working); refused once it is used or revoked. */
export async function resendInvitation(
  db: Tx,
  input: { teamId: string; invitationId: string; actorId: string },
): Promise<IssuedInvitation> {
  return db.transaction(async (tx) => {
    const before = await lockTeamInvitation(tx, input.teamId, input.invitationId);
    const status = invitationStatus(before);
    if (status === "accepted" || status === "revoked")
      throw new DomainError(
        `The invitation to ${before.email} was ${status === "accepted" ? "already used" : "revoked"}; invite again instead.`,
        {
          status: 409,
        },
      );
    const fresh = newToken();
    const [invitation] = await tx
      .update(invitations)
      .set({ tokenHash: fresh.tokenHash, expiresAt: fresh.expiresAt, lastSentAt: null })
      .where(eq(invitations.id, before.id))
      .returning();
    await recordActivity(tx, {
      teamId: input.teamId,
      userId: input.actorId,
      action: "invitation.resent",
      summary: `sent a new invitation link to ${before.email}`,
    });
    return { invitation, token: fresh.token, refreshed: true };
  });
}

/** Revokes an open invitation: its link then shows that it was revoked. */
export async function revokeInvitation(db: Tx, input: { teamId: string; invitationId: string; actorId: string }): Promise<Invitation> {
  return db.transaction(async (tx) => {
    const invitation = await lockTeamInvitation(tx, input.teamId, input.invitationId);
    if (invitation.acceptedAt)
      throw new DomainError(`The invitation to ${invitation.email} was already used; remove the member instead.`, { status: 409 });
    if (invitation.revokedAt) return invitation;
    const [revoked] = await tx.update(invitations).set({ revokedAt: new Date() }).where(eq(invitations.id, invitation.id)).returning();
    await recordActivity(tx, {
      teamId: input.teamId,
      userId: input.actorId,
      action: "invitation.revoked",
      summary: `revoked the invitation to ${invitation.email}`,
    });
    return revoked;
  });
}

export interface OpenInvitation {
  id: string;
  email: string;
  role: Role;
  invitedBy: string | null;
  lastSentAt: Date | null;
  expiresAt: Date;
  createdAt: Date;
  status: "pending" | "expired";
}

/** A team's invitations that are neither used nor revoked (expired ones included, to resend), newest first. */
export async function listOpenInvitations(db: Tx, teamId: string): Promise<OpenInvitation[]> {
  const rows = await db
    .select({
      id: invitations.id,
      email: invitations.email,
      role: invitations.role,
      invitedBy: sql<string | null>`coalesce(${users.name}, ${users.login})`,
      lastSentAt: invitations.lastSentAt,
      expiresAt: invitations.expiresAt,
      createdAt: invitations.createdAt,
      acceptedAt: invitations.acceptedAt,
      revokedAt: invitations.revokedAt,
    })
    .from(invitations)
    .leftJoin(users, eq(users.id, invitations.invitedBy))
    .where(and(eq(invitations.teamId, teamId), isNull(invitations.acceptedAt), isNull(invitations.revokedAt)))
    .orderBy(sql`${invitations.createdAt} desc`, asc(invitations.email));
  const now = new Date();
  return rows.map(({ acceptedAt: _a, revokedAt: _r, ...r }) => ({
    ...r,
    status: invitationStatus({ acceptedAt: null, revokedAt: null, expiresAt: r.expiresAt }, now) as "pending" | "expired",
  }));
}

/** What an invitation link shows: the invitation, its team, who sent and who used it, and where it stands. */
export interface InvitationView {
  id: string;
  teamId: string;
  teamName: string;
  email: string;
  role: Role;
  invitedBy: string | null;
  expiresAt: Date;
  acceptedAt: Date | null;
  acceptedBy: string | null;
  acceptedById: string | null;
  revokedAt: Date | null;
  status: InvitationStatus;
}

/** The invitation a token belongs to, or null when the token is malformed, unknown or was replaced by a resend. */
export async function findInvitationByToken(db: Tx, token: string): Promise<InvitationView | null> {
  if (!TOKEN_FORM.test(token)) return null;
  const inviter = alias(users, "inviter");
  const accepter = alias(users, "accepter");
  const [row] = await db
    .select({
      invitation: invitations,
      teamName: teams.name,
      invitedBy: sql<string | null>`coalesce(${inviter.name}, ${inviter.login})`,
      acceptedBy: sql<string | null>`coalesce(${accepter.name}, ${accepter.login})`,
    })
    .from(invitations)
    .innerJoin(teams, eq(teams.id, invitations.teamId))
    .leftJoin(inviter, eq(inviter.id, invitations.invitedBy))
    .leftJoin(accepter, eq(accepter.id, invitations.acceptedBy))
    .where(eq(invitations.tokenHash, hashInvitationToken(token)));
  if (!row) return null;
  const i = row.invitation;
  return {
    id: i.id,
    teamId: i.teamId,
    teamName: row.teamName,
    email: i.email,
    role: i.role,
    invitedBy: row.invitedBy,
    expiresAt: i.expiresAt,
    acceptedAt: i.acceptedAt,
    acceptedBy: row.acceptedBy,
    acceptedById: i.acceptedBy,
    revokedAt: i.revokedAt,
    status: invitationStatus(i),
  };
}

/** Why a link could not be used, for the page that says so. */
export class InvitationUnusable extends DomainError {
  readonly reason: InvitationStatus | "unknown" | "member";
  constructor(reason: InvitationStatus | "unknown" | "member", message: string) {
    super(message, { status: reason === "unknown" ? 404 : 409 });
    this.name = "InvitationUnusable";
    this.reason = reason;
  }
}

/**
 * Accepts an invitation for the signed-in person: they join the team with the invitation's role and the link is
 * used up. The invitation row is locked, so of two people using one link at the same moment only one gets in.
 * The person's own e-mail address need not be the invited one (see docs/decisions/0007-invitation-goes-to-whoever-accepts.md).
 * Someone who is already a member is refused and the link stays usable.
 */
export async function acceptInvitation(db: Tx, input: { token: string; userId: string }): Promise<{ teamId: string; role: Role }> {
  if (!TOKEN_FORM.test(input.token)) throw new InvitationUnusable("unknown", "This invitation link is not valid.");
  return db.transaction(async (tx) => {
    const [invitation] = await tx
      .select()
      .from(invitations)
      .where(eq(invitations.tokenHash, hashInvitationToken(input.token)))
      .for("update");
    if (!invitation) throw new InvitationUnusable("unknown", "This invitation link is not valid.");
    const status = invitationStatus(invitation);
    if (status !== "pending")
      throw new InvitationUnusable(status, `This invitation was ${status === "accepted" ? "already used" : status}.`);
    const [existing] = await tx
      .select({ role: memberships.role })
      .from(memberships)
      .where(and(eq(memberships.teamId, invitation.teamId), eq(memberships.userId, input.userId)));
    if (existing)
      throw new InvitationUnusable(
        "member",
        `You are already a member of this team (as ${article(existing.role)}); the invitation was not used.`,
      );
    await tx.insert(memberships).values({ teamId: invitation.teamId, userId: input.userId, role: invitation.role });
    await tx.update(invitations).set({ acceptedAt: new Date(), acceptedBy: input.userId }).where(eq(invitations.id, invitation.id));
    await recordActivity(tx, {
      teamId: invitation.teamId,
      userId: input.userId,
      action: "invitation.accepted",
      summary: `joined the team as ${article(invitation.role)} with the invitation sent to ${invitation.email}`,
    });
    return { teamId: invitation.teamId, role: invitation.role };
  });
}
