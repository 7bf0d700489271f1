import { createHash } from "node:crypto";
import { createServer } from "node:net";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startFakeMail, REFUSED_DOMAIN, type FakeMail } from "../../scripts/fakes/mail.ts";
import { makeTeam, makeUser } from "../../tests/factories.ts";
import { testDb } from "../../tests/support/db.ts";
import { refusalOf } from "../../tests/support/refusal.ts";
import { invitations } from "../db/schema.ts";
import { changeRoleAndTell, inviteByEmail, removeMemberAndTell, resendInvitationMail, type Send } from "../mail/team.server.ts";
import { createMailer } from "../mail.server.ts";
import { listActivity } from "./activity.server.ts";
import {
  acceptInvitation,
  findInvitationByToken,
  INVITATION_DAYS,
  type InvitationUnusable,
  listOpenInvitations,
  revokeInvitation,
} from "./invitations.server.ts";
import { addMember, getRole } from "./teams.server.ts";

const db = testDb();
const APP = "http://skewsmith.test";
let fake: FakeMail;
let mailer: ReturnType<typeof createMailer>;
let send: Send;

/** A port nothing listens on: a mail server that is down. */
async function closedPort(): Promise<number> {
  const server = createServer();
  await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", resolve));
  const { port } = server.address() as { port: number };
  await new Promise((resolve) => server.close(resolve));
  return port;
}

beforeAll(async () => {
  fake = await startFakeMail();
  mailer = createMailer(fake.smtpUrl, "Skewsmith <no-reply@skewsmith.invalid>");
  send = (mail) => mailer.send(mail);
});
afterAll(async () => {
  mailer.close();
  await fake.close();
  await db.$client.end();
});

async function setup() {
  const owner = await makeUser(db, { name: "Marit Owner" });
  const team = await makeTeam(db, { owner, name: `Pier ${Date.now().toString(36)}` });
  return { owner, team, context: { appUrl: APP, team: { id: team.id, name: team.name }, actor: owner } };
}

const address = () => `invitee-${Math.random().toString(36).slice(2)}@example.test`;

/** The token in the last message caught for `to` (the link is the only line that starts with the app's address). */
function tokenMailedTo(to: string): string {
  const message = fake.messages().find((m) => m.to.includes(to));
  expect(message, `a message to ${to}`).toBeDefined();
  const link = message!.text.split("\n").find((line) => line.startsWith(`${APP}/invitations/`));
  expect(link).toBeDefined();
  return link!.slice(`${APP}/invitations/`.length).trim();
}

describe("inviting by e-mail", () => {
  it("mails a single-use link that lets the person who signs in join with the role; only the token's hash is stored", async () => {
    const { owner, team, context } = await setup();
    const email = address();
    const { issued, mail } = await inviteByEmail(db, context, { email, role: "editor" }, send);
    expect(mail).toEqual({ sent: true, to: email });

    const message = fake.messages().find((m) => m.to.includes(email))!;
    expect(message.subject).toBe(`Marit Owner invited you to the team ${team.name} on Skewsmith`);
    expect(message.text).toContain(`Marit Owner invited ${email} to join the team ${team.name} on Skewsmith as an editor.`);
    const token = tokenMailedTo(email);
    expect(token).toBe(issued.token);
    const [row] = await db.select().from(invitations).where(eq(invitations.id, issued.invitation.id));
    // SHA-256 of the token, hex (FIPS 180-4), computed here independently of the app's helper.
    expect(row.tokenHash).toBe(createHash("sha256").update(token, "utf8").digest("hex"));
    expect(JSON.stringify(row)).not.toContain(token);
    expect(row.lastSentAt).not.toBeNull();
    const days = (row.expiresAt.getTime() - row.createdAt.getTime()) / 86_400_000;
    expect(days).toBeCloseTo(INVITATION_DAYS, 3);

    // Someone with another address accepts: the team gets the account that signed in.
    const joiner = await makeUser(db, { email: "someone.else@example.test" });
    expect(await acceptInvitation(db, { token, userId: joiner.id })).toEqual({ teamId: team.id, role: "editor" });
    expect(await getRole(db, team.id, joiner.id)).toBe("editor");
    const [activity] = await listActivity(db, { teamId: team.id });
    expect(activity).toMatchObject({
      action: "invitation.accepted",
      summary: `joined the team as an editor with the invitation sent to ${email}`,
    });

    // Used once: a second person gets "already used", and the page can say so.
    const late = await makeUser(db);
    const second = (await refusalOf(acceptInvitation(db, { token, userId: late.id }))) as InvitationUnusable;
    expect(second.reason).toBe("accepted");
    expect(await getRole(db, team.id, late.id)).toBeNull();
    expect(await findInvitationByToken(db, token)).toMatchObject({ status: "accepted", acceptedById: joiner.id });
    expect(await listOpenInvitations(db, team.id)).toEqual([]);
    expect(owner.id).not.toBe(joiner.id);
  });

  it("lets only one of two people using one link at the same moment in", async () => {
    const { context, team } = await setup();
    const email = address();
    const { issued } = await inviteByEmail(db, context, { email, role: "viewer" }, send);
    const [a, b] = [await makeUser(db), await makeUser(db)];
    const results = await Promise.allSettled([
      acceptInvitation(db, { token: issued.token, userId: a.id }),
      acceptInvitation(db, { token: issued.token, userId: b.id }),
    ]);
    expect(results.filter((r) => r.status === "fulfilled")).toHaveLength(1);
    const roles = [await getRole(db, team.id, a.id), await getRole(db, team.id, b.id)];
    expect(roles.filter((r) => r === "viewer")).toHaveLength(1);
  });

  it("refuses an expired link, a revoked one and an unknown one, each with its reason", async () => {
    const { owner, team, context } = await setup();
    const person = await makeUser(db);

    const expired = await inviteByEmail(db, context, { email: address(), role: "viewer" }, send);
    await db
      .update(invitations)
      .set({ expiresAt: new Date(Date.now() - 1000) })
      .where(eq(invitations.id, expired.issued.invitation.id));
    expect(((await refusalOf(acceptInvitation(db, { token: expired.issued.token, userId: person.id }))) as InvitationUnusable).reason).toBe(
      "expired",
    );
    expect((await findInvitationByToken(db, expired.issued.token))?.status).toBe("expired");
    expect((await listOpenInvitations(db, team.id)).map((i) => i.status)).toEqual(["expired"]);

    const revoked = await inviteByEmail(db, context, { email: address(), role: "viewer" }, send);
    await revokeInvitation(db, { teamId: team.id, invitationId: revoked.issued.invitation.id, actorId: owner.id });
    expect(((await refusalOf(acceptInvitation(db, { token: revoked.issued.token, userId: person.id }))) as InvitationUnusable).reason).toBe(
      "revoked",
    );

    for (const token of ["x".repeat(43), "short", "../../etc/passwd", ""]) {
      expect(((await refusalOf(acceptInvitation(db, { token, userId: person.id }))) as InvitationUnusable).reason).toBe("unknown");
      expect(await findInvitationByToken(db, token)).toBeNull();
    }
    expect(await getRole(db, team.id, person.id)).toBeNull();
  });

  it("resending makes a new link and a new expiry; the old link stops working", async () => {
    const { team, context } = await setup();
    const email = address();
    const first = await inviteByEmail(db, context, { email, role: "editor" }, send);
    await db
      .update(invitations)
      .set({ expiresAt: new Date(Date.now() - 1000) })
      .where(eq(invitations.id, first.issued.invitation.id));
    const again = await resendInvitationMail(db, context, first.issued.invitation.id, send);
    expect(again.mail.sent).toBe(true);
    expect(again.issued.token).not.toBe(first.issued.token);
    expect(tokenMailedTo(email)).toBe(again.issued.token);
    expect(again.issued.invitation.expiresAt.getTime()).toBeGreaterThan(Date.now() + (INVITATION_DAYS - 1) * 86_400_000);
    expect(await findInvitationByToken(db, first.issued.token)).toBeNull();
    expect((await findInvitationByToken(db, again.issued.token))?.status).toBe("pending");
    expect((await listOpenInvitations(db, team.id)).map((i) => i.id)).toEqual([first.issued.invitation.id]);
  });

  it("inviting an address again refreshes its open invitation (one live link per address), and refuses a member's address", async () => {
    const { owner, team, context } = await setup();
    const email = address();
    const first = await inviteByEmail(db, context, { email, role: "viewer" }, send);
    const second = await inviteByEmail(db, context, { email: email.toUpperCase(), role: "owner" }, send);
    expect(second.issued.refreshed).toBe(true);
    expect(second.issued.invitation.id).toBe(first.issued.invitation.id);
    expect(second.issued.invitation.role).toBe("owner");
    expect(await findInvitationByToken(db, first.issued.token)).toBeNull();

    const error = await refusalOf(inviteByEmail(db, context, { email: owner.email!.toUpperCase(), role: "editor" }, send));
    expect(error).toMatchObject({ field: "email", status: 409 });
    expect(await listOpenInvitations(db, team.id)).toHaveLength(1);
  });

  it("keeps an invitation whose mail could not be sent, marked unsent, for a later resend", async () => {
    const { team, context } = await setup();
    const down = createMailer(`smtp://127.0.0.1:${await closedPort()}`, "Skewsmith <no-reply@skewsmith.invalid>");
    const email = address();
    const { issued, mail } = await inviteByEmail(db, context, { email, role: "editor" }, (m) => down.send(m));
    down.close();
    expect(mail.sent).toBe(false);
    expect(mail.sent ? "" : mail.problem).toMatch(/ECONNREFUSED|connect/i);
    const [open] = await listOpenInvitations(db, team.id);
    expect(open).toMatchObject({ id: issued.invitation.id, lastSentAt: null, status: "pending" });

    // A server that refuses the mailbox (SMTP 550, RFC 5321 §4.2.2) is a failure too, reported with the server's words.
    const refused = await inviteByEmail(db, context, { email: `someone@${REFUSED_DOMAIN}`, role: "viewer" }, send);
    expect(refused.mail).toMatchObject({ sent: false, to: `someone@${REFUSED_DOMAIN}` });
    expect(refused.mail.sent ? "" : refused.mail.problem).toMatch(/^550/);

    const resent = await resendInvitationMail(db, context, issued.invitation.id, send);
    expect(resent.mail).toEqual({ sent: true, to: email });
    expect((await listOpenInvitations(db, team.id)).find((i) => i.id === issued.invitation.id)?.lastSentAt).not.toBeNull();
  });

  it("leaves the link unused when someone already in the team follows it", async () => {
    const { owner, team, context } = await setup();
    const { issued } = await inviteByEmail(db, context, { email: address(), role: "editor" }, send);
    const error = (await refusalOf(acceptInvitation(db, { token: issued.token, userId: owner.id }))) as InvitationUnusable;
    expect(error.reason).toBe("member");
    expect(await getRole(db, team.id, owner.id)).toBe("owner");
    expect((await findInvitationByToken(db, issued.token))?.status).toBe("pending");
  });

  it("refuses to resend or revoke an invitation of another team, and to resend a used or revoked one", async () => {
    const { owner, context } = await setup();
    const other = await setup();
    const { issued } = await inviteByEmail(db, context, { email: address(), role: "editor" }, send);
    expect((await refusalOf(resendInvitationMail(db, other.context, issued.invitation.id, send))).status).toBe(404);
    await revokeInvitation(db, { teamId: context.team.id, invitationId: issued.invitation.id, actorId: owner.id });
    expect((await refusalOf(resendInvitationMail(db, context, issued.invitation.id, send))).message).toMatch(/was revoked; invite again/);
  });
});

describe("telling people about their membership", () => {
  it("mails a member whose role changed, and one who was removed", async () => {
    const { owner, team, context } = await setup();
    const member = await makeUser(db, { name: "Tam Member", email: address() });
    const quiet = await makeUser(db, { email: null });
    await addMember(db, { teamId: team.id, userId: member.id, role: "viewer", actorId: owner.id });
    await addMember(db, { teamId: team.id, userId: quiet.id, role: "viewer", actorId: owner.id });

    const changed = await changeRoleAndTell(db, context, { userId: member.id, role: "editor" }, send);
    expect(changed.change).toMatchObject({ from: "viewer", to: "editor" });
    expect(changed.mail).toEqual({ sent: true, to: member.email });
    const roleMail = fake.messages().find((m) => m.to.includes(member.email!))!;
    expect(roleMail.subject).toBe(`Your role in ${team.name} is now editor`);
    expect(roleMail.text).toContain(`Marit Owner changed your role in the team ${team.name} on Skewsmith from viewer to editor.`);

    expect((await changeRoleAndTell(db, context, { userId: member.id, role: "editor" }, send)).mail).toBeNull();
    expect((await changeRoleAndTell(db, context, { userId: quiet.id, role: "editor" }, send)).mail).toMatchObject({
      sent: false,
      to: null,
    });

    const removed = await removeMemberAndTell(db, context, member.id, send);
    expect(removed.mail).toEqual({ sent: true, to: member.email });
    const removalMail = fake.messages().find((m) => m.to.includes(member.email!))!;
    expect(removalMail.subject).toBe(`You were removed from ${team.name}`);
    expect(removalMail.text).toContain(`Marit Owner removed you from the team ${team.name} on Skewsmith, where you were an editor.`);
    expect(await getRole(db, team.id, member.id)).toBeNull();
  });
});
