/**
 * The mail a team sends: invitations, and notes to a person whose role changed or who was removed. Every change
 * is committed first and the mail sent after; a mail that cannot be sent loses nothing: the caller is told why
 * and can offer to send again. `send` is the app's SMTP sender unless a test passes another.
 */
import type { Tx } from "../db/client.server.ts";
import type { Role, User } from "../db/schema.ts";
import { sendMail, type OutgoingMail } from "../mail.server.ts";
import {
  createInvitation,
  INVITATION_DAYS,
  markInvitationSent,
  resendInvitation,
  type IssuedInvitation,
} from "../models/invitations.server.ts";
import { changeRole, removeMember, type RoleChange } from "../models/teams.server.ts";
import { displayName } from "../models/users.server.ts";
import { ROLE_SUMMARY } from "../roles.ts";

export type Send = (mail: OutgoingMail) => Promise<unknown>;

/** What happened to one e-mail: sent, not sent (and why), or nobody to send it to. */
export type MailOutcome =
  { sent: true; to: string } | { sent: false; to: string; problem: string } | { sent: false; to: null; problem: string };

const DATE = new Intl.DateTimeFormat("en-GB", { dateStyle: "long", timeStyle: "short", timeZone: "UTC" });
const article = (role: Role) => (role === "owner" ? "an owner" : `an ${role}`);

/** Sends one mail; any failure comes back as a reason instead of an exception. */
export async function deliver(send: Send, mail: OutgoingMail): Promise<MailOutcome> {
  try {
    await send(mail);
    return { sent: true, to: mail.to };
  } catch (error) {
    const reason = (error as { response?: string; message?: string }).response ?? (error as Error).message ?? String(error);
    console.warn(`mail to ${mail.to} (${mail.subject}) was not sent: ${reason}`);
    return { sent: false, to: mail.to, problem: reason.replace(/\s+/g, " ").slice(0, 300) };
  }
}

/** The address of an invitation link. */
export function invitationUrl(appUrl: string, token: string): string {
  return `${appUrl}/invitations/${token}`;
}

/** The invitation e-mail: who invites whom to which team as what, the single-use link and when it stops working. */
export function invitationMail(input: {
  appUrl: string;
  to: string;
  teamName: string;
  role: Role;
  inviter: string;
  token: string;
  expiresAt: Date;
}): OutgoingMail {
  const url = invitationUrl(input.appUrl, input.token);
  return {
    to: input.to,
    subject: `${input.inviter} invited you to the team ${input.teamName} on Skewsmith`,
    text: [
      "Hello,",
      "",
      `${input.inviter} invited ${input.to} to join the team ${input.teamName} on Skewsmith as ${article(input.role)}.`,
      ROLE_SUMMARY[input.role],
      "",
      `Accept the invitation here (the link works once, until ${DATE.format(input.expiresAt)} UTC, ${INVITATION_DAYS} days from when it was sent):`,
      url,
      "",
      "You sign in with GitHub first. The team gets the account you sign in with, whichever e-mail address it has.",
      "If you did not expect this invitation, ignore this message: nothing happens unless the link is used.",
      "",
    ].join("\n"),
  };
}

/** The note to a member whose role an owner changed. */
export function roleChangedMail(input: {
  to: string;
  name: string;
  teamName: string;
  before: Role;
  after: Role;
  by: string;
  appUrl: string;
  teamId: string;
}): OutgoingMail {
  return {
    to: input.to,
    subject: `Your role in ${input.teamName} is now ${input.after}`,
    text: [
      `Hello ${input.name},`,
      "",
      `${input.by} changed your role in the team ${input.teamName} on Skewsmith from ${input.before} to ${input.after}.`,
      ROLE_SUMMARY[input.after],
      "",
      `The team: ${input.appUrl}/teams/${input.teamId}`,
      "",
    ].join("\n"),
  };
}

/** The note to a person an owner removed from a team. */
export function removedMail(input: { to: string; name: string; teamName: string; role: Role; by: string }): OutgoingMail {
  return {
    to: input.to,
    subject: `You were removed from ${input.teamName}`,
    text: [
      `Hello ${input.name},`,
      "",
      `${input.by} removed you from the team ${input.teamName} on Skewsmith, where you were ${article(input.role)}.`,
      "You no longer see its projects, effects, sprites or target profiles. Your account and your other teams are not affected.",
      "If you think this was a mistake, ask one of the team's owners to invite you again.",
      "",
    ].join("\n"),
  };
}

interface TeamContext {
  appUrl: string;
  team: { id: string; name: string };
  actor: User;
}

async function mailInvitation(db: Tx, context: TeamContext, issued: IssuedInvitation, send: Send): Promise<MailOutcome> {
  const outcome = await deliver(
    send,
    invitationMail({
      appUrl: context.appUrl,
      to: issued.invitation.email,
      teamName: context.team.name,
      role: issued.invitation.role,
      inviter: displayName(context.actor),
      token: issued.token,
      expiresAt: issued.invitation.expiresAt,
    }),
  );
  if (outcome.sent) await markInvitationSent(db, issued.invitation.id);
  return outcome;
}

/** Invites an address and mails the link; the invitation stays (unsent, to resend) when the mail fails. */
export async function inviteByEmail(
  db: Tx,
  context: TeamContext,
  input: { email: string; role: Role },
  send: Send = sendMail,
): Promise<{ issued: IssuedInvitation; mail: MailOutcome }> {
  const issued = await createInvitation(db, { teamId: context.team.id, email: input.email, role: input.role, actorId: context.actor.id });
  return { issued, mail: await mailInvitation(db, context, issued, send) };
}

/** Gives an open invitation a new link and expiry, and mails it. */
export async function resendInvitationMail(
  db: Tx,
  context: TeamContext,
  invitationId: string,
  send: Send = sendMail,
): Promise<{ issued: IssuedInvitation; mail: MailOutcome }> {
  const issued = await resendInvitation(db, { teamId: context.team.id, invitationId, actorId: context.actor.id });
  return { issued, mail: await mailInvitation(db, context, issued, send) };
}

const noAddress = (user: User): MailOutcome => ({
  sent: false,
  to: null,
  problem: `${displayName(user)} shares no e-mail address, so they could not be told by e-mail`,
});

/** Changes a member's role and tells them by e-mail. */
export async function changeRoleAndTell(
  db: Tx,
  context: TeamContext,
  input: { userId: string; role: Role },
  send: Send = sendMail,
): Promise<{ change: RoleChange | null; mail: MailOutcome | null }> {
  const change = await changeRole(db, { teamId: context.team.id, userId: input.userId, role: input.role, actorId: context.actor.id });
  if (!change || change.user.id === context.actor.id) return { change, mail: null };
  if (!change.user.email) return { change, mail: noAddress(change.user) };
  const mail = await deliver(
    send,
    roleChangedMail({
      to: change.user.email,
      name: displayName(change.user),
      teamName: context.team.name,
      before: change.from,
      after: change.to,
      by: displayName(context.actor),
      appUrl: context.appUrl,
      teamId: context.team.id,
    }),
  );
  return { change, mail };
}

/** Removes a member (not oneself: that is leaving) and tells them by e-mail. */
export async function removeMemberAndTell(
  db: Tx,
  context: TeamContext,
  userId: string,
  send: Send = sendMail,
): Promise<{ removed: { user: User; role: Role }; mail: MailOutcome }> {
  const removed = await removeMember(db, { teamId: context.team.id, userId, actorId: context.actor.id });
  if (!removed.user.email) return { removed, mail: noAddress(removed.user) };
  const mail = await deliver(
    send,
    removedMail({
      to: removed.user.email,
      name: displayName(removed.user),
      teamName: context.team.name,
      role: removed.role,
      by: displayName(context.actor),
    }),
  );
  return { removed, mail };
}
