import { useState } from "react";
import { data, Form } from "react-router";
import type { Route } from "./+types/team.members";
import { attempt, invalid, requireAtLeast, unknownIntent } from "../actions.server.ts";
import { ConfirmDialog } from "../components/ConfirmDialog.tsx";
import { RemoveMemberQuestion } from "../components/team/RemoveMemberQuestion.tsx";
import {
  ActionsHeader,
  Button,
  ColumnHeader,
  Counted,
  Crumbs,
  EmptyState,
  Field,
  FormError,
  Notice,
  PageTitle,
  Panel,
  RoleBadge,
  Select,
  TABLE,
  TCELL,
  TextInput,
  THEAD,
  TROW,
  Timestamp,
} from "../components/ui.tsx";
import { db } from "../db.server.ts";
import { env } from "../env.server.ts";
import { changeRoleForm, EMAIL_MAX, errorsFor, invitationForm, inviteForm, memberForm, parseForm, type ActionResult } from "../forms.ts";
import { requireTeamRole } from "../guards.server.ts";
import { formText, readForm } from "../http.server.ts";
import { changeRoleAndTell, inviteByEmail, removeMemberAndTell, resendInvitationMail, type MailOutcome } from "../mail/team.server.ts";
import { INVITATION_DAYS, listOpenInvitations, revokeInvitation } from "../models/invitations.server.ts";
import { listMembers } from "../models/teams.server.ts";
import { displayName } from "../models/users.server.ts";
import { ROLE_SUMMARY, ROLES, type Role } from "../roles.ts";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Members · ${data?.team.name ?? "Team"} · Skewsmith` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { user, team, role } = await requireTeamRole(request, params.teamId, "viewer");
  const [members, invitations] = await Promise.all([
    listMembers(db(), team.id),
    role === "owner" ? listOpenInvitations(db(), team.id) : Promise.resolve(null),
  ]);
  return { team: { id: team.id, name: team.name }, role, me: user.id, members, invitations, linkDays: INVITATION_DAYS };
}

/** An answer of this page: the usual result, and a warning when the change was made but its e-mail was not sent. */
type MembersResult = ActionResult & { warning?: string };

const DATE = new Intl.DateTimeFormat("en-GB", { dateStyle: "medium", timeStyle: "short", timeZone: "UTC" });
const article = (role: Role) => (role === "owner" ? "an owner" : `an ${role}`);

/** The change's message plus what happened to its e-mail: fine, or a warning that names why it was not sent. */
function withMail(intent: string, message: string, mail: MailOutcome | null, told: string, subject?: string) {
  if (!mail) return data<MembersResult>({ ok: true, intent, message, subject });
  if (mail.sent) return data<MembersResult>({ ok: true, intent, message: `${message} ${told.replace("{to}", mail.to)}`, subject });
  const warning = mail.to
    ? `The e-mail to ${mail.to} could not be sent (${mail.problem}).`
    : `${mail.problem.charAt(0).toUpperCase()}${mail.problem.slice(1)}.`;
  return data<MembersResult>({ ok: true, intent, message, warning, subject });
}

/** Everything here but reading is for owners: inviting, resending, revoking, changing roles and removing members. */
export async function action({ request, params }: Route.ActionArgs) {
  const { user, team, role } = await requireTeamRole(request, params.teamId, "viewer");
  requireAtLeast(role, "owner");
  const form = await readForm(request);
  const intent = formText(form, "intent");
  const context = { appUrl: env().APP_URL, team: { id: team.id, name: team.name }, actor: user };
  switch (intent) {
    case "invite": {
      const parsed = parseForm(inviteForm, form);
      if (!parsed.ok) return invalid(intent, parsed.errors);
      let outcome: Awaited<ReturnType<typeof inviteByEmail>> | undefined;
      const result = await attempt(intent, async () => {
        outcome = await inviteByEmail(db(), context, parsed.data);
      });
      if (!outcome) return result;
      const { issued, mail } = outcome;
      const again = issued.refreshed ? " (the address had an open invitation: its old link no longer works)" : "";
      const message = `Invited ${issued.invitation.email} as ${article(issued.invitation.role)}${again}.`;
      return withMail(
        intent,
        message,
        mail,
        `The link went to {to}; it works once, until ${DATE.format(issued.invitation.expiresAt)} UTC.`,
      );
    }
    case "resend-invitation": {
      const parsed = parseForm(invitationForm, form);
      if (!parsed.ok) return invalid(intent, parsed.errors);
      let outcome: Awaited<ReturnType<typeof resendInvitationMail>> | undefined;
      const result = await attempt(
        intent,
        async () => {
          outcome = await resendInvitationMail(db(), context, parsed.data.invitationId);
        },
        parsed.data.invitationId,
      );
      if (!outcome) return result;
      return withMail(
        intent,
        `Made a new link for ${outcome.issued.invitation.email}; the earlier one no longer works.`,
        outcome.mail,
        `It went to {to} and works until ${DATE.format(outcome.issued.invitation.expiresAt)} UTC.`,
        parsed.data.invitationId,
      );
    }
    case "revoke-invitation": {
      const parsed = parseForm(invitationForm, form);
      if (!parsed.ok) return invalid(intent, parsed.errors);
      return attempt(
        intent,
        async () => {
          const revoked = await revokeInvitation(db(), { teamId: team.id, invitationId: parsed.data.invitationId, actorId: user.id });
          return `Revoked the invitation to ${revoked.email}: its link now says so.`;
        },
        parsed.data.invitationId,
      );
    }
    case "change-role": {
      const parsed = parseForm(changeRoleForm, form);
      if (!parsed.ok) return invalid(intent, parsed.errors, 400, formText(form, "userId"));
      let outcome: Awaited<ReturnType<typeof changeRoleAndTell>> | undefined;
      const result = await attempt(
        intent,
        async () => {
          outcome = await changeRoleAndTell(db(), context, parsed.data);
        },
        parsed.data.userId,
      );
      if (!outcome) return result;
      if (!outcome.change)
        return data<MembersResult>({ ok: true, intent, message: "That is their role already.", subject: parsed.data.userId });
      const { change } = outcome;
      return withMail(
        intent,
        `Made ${displayName(change.user)} ${article(change.to)} (was ${change.from}).`,
        outcome.mail,
        "They were told by e-mail at {to}.",
        parsed.data.userId,
      );
    }
    case "remove-member": {
      const parsed = parseForm(memberForm, form);
      if (!parsed.ok) return invalid(intent, parsed.errors);
      if (formText(form, "confirmed") !== "yes")
        return invalid(intent, { form: "Confirm the removal first: use the Remove button, which asks." }, 400, parsed.data.userId);
      if (parsed.data.userId === user.id)
        return invalid(intent, { form: "To leave the team yourself, use Leave team on the team's page." }, 400, parsed.data.userId);
      let outcome: Awaited<ReturnType<typeof removeMemberAndTell>> | undefined;
      const result = await attempt(
        intent,
        async () => {
          outcome = await removeMemberAndTell(db(), context, parsed.data.userId);
        },
        parsed.data.userId,
      );
      if (!outcome) return result;
      return withMail(
        intent,
        `Removed ${displayName(outcome.removed.user)} from ${team.name}.`,
        outcome.mail,
        "They were told by e-mail at {to}.",
      );
    }
    default:
      return unknownIntent(intent);
  }
}

type LoaderData = Route.ComponentProps["loaderData"];

function ResultNotice({ result, intents }: { result: MembersResult | undefined; intents: string[] }) {
  if (!result || !intents.includes(result.intent)) return null;
  // Refusals about one row (a role change, a resend) are shown in that row, field messages next to their field.
  if (!result.ok)
    return (
      <FormError>
        {result.intent === "remove-member" ? Object.values(result.errors)[0] : result.subject ? undefined : result.errors.form}
      </FormError>
    );
  return (
    <div className="flex flex-col gap-2" data-testid="members-result">
      {result.message ? <Notice>{result.message}</Notice> : null}
      {result.warning ? (
        <FormError>
          {result.warning}{" "}
          {result.intent === "invite" || result.intent === "resend-invitation"
            ? "The invitation is kept: use Resend in the list below once mail works."
            : "The change itself is made."}
        </FormError>
      ) : null}
    </div>
  );
}

function MemberRow({
  member,
  team,
  me,
  isOwner,
  resetKey,
  error,
}: {
  member: LoaderData["members"][number];
  team: LoaderData["team"];
  me: string;
  isOwner: boolean;
  resetKey: number;
  error?: string;
}) {
  const name = member.name ?? member.login;
  return (
    <tr className={TROW} data-testid={`member-${member.login}`}>
      <td className={TCELL}>
        <span className="font-medium text-ink-100">{name}</span>
        {member.userId === me ? <span className="ml-2 text-xs text-ink-400">(you)</span> : null}
        <div className="num text-xs text-ink-500">@{member.login}</div>
      </td>
      <td className={`${TCELL} text-ink-300`}>{member.email ?? <span className="text-ink-500">no e-mail shared</span>}</td>
      <td className={TCELL}>
        {isOwner ? (
          <Form method="post" preventScrollReset className="flex items-center gap-2">
            <input type="hidden" name="userId" value={member.userId} />
            <label className="sr-only" htmlFor={`role-${member.userId}`}>
              Role of {name}
            </label>
            <Select
              key={`${member.role}-${resetKey}`}
              id={`role-${member.userId}`}
              name="role"
              defaultValue={member.role}
              className="w-28 py-1"
            >
              {ROLES.map((r) => (
                <option key={r} value={r}>
                  {r}
                </option>
              ))}
            </Select>
            <Button size="sm" name="intent" value="change-role">
              Change
            </Button>
          </Form>
        ) : (
          <RoleBadge role={member.role} />
        )}
        {error ? (
          <p className="mt-1 max-w-xs text-xs text-alert-300" role="alert">
            {error}
          </p>
        ) : null}
      </td>
      <td className={TCELL}>
        <Timestamp value={member.joinedAt} />
      </td>
      {isOwner ? (
        <td className={`${TCELL} text-right`}>
          {member.userId !== me ? (
            <ConfirmDialog
              trigger="Remove"
              triggerLabel={`Remove ${name}`}
              confirmPage={`/teams/${team.id}/members/${member.userId}/remove`}
              title={`Remove ${name} from ${team.name}?`}
              confirm={`Remove ${name}`}
              intent="remove-member"
              fields={{ userId: member.userId }}
            >
              <RemoveMemberQuestion name={name} email={member.email} role={member.role} teamName={team.name} />
            </ConfirmDialog>
          ) : null}
        </td>
      ) : null}
    </tr>
  );
}

function InvitationRow({ invitation, error }: { invitation: NonNullable<LoaderData["invitations"]>[number]; error?: string }) {
  const expired = invitation.status === "expired";
  return (
    <tr className={TROW} data-testid={`invitation-${invitation.email}`}>
      <td className={`${TCELL} num text-ink-100`}>{invitation.email}</td>
      <td className={TCELL}>
        <RoleBadge role={invitation.role} />
      </td>
      <td className={`${TCELL} text-ink-300`}>{invitation.invitedBy ?? "someone who left"}</td>
      <td className={TCELL}>
        {invitation.lastSentAt ? (
          <Timestamp value={invitation.lastSentAt} />
        ) : (
          <span className="text-alert-300">not sent: the mail failed</span>
        )}
      </td>
      <td className={TCELL}>
        <span className={expired ? "text-alert-300" : "text-ink-300"}>{expired ? "expired " : "until "}</span>
        <Timestamp value={invitation.expiresAt} />
      </td>
      <td className={`${TCELL} text-right`}>
        <div className="flex items-center justify-end gap-1">
          <Form method="post" preventScrollReset>
            <input type="hidden" name="invitationId" value={invitation.id} />
            <Button size="sm" name="intent" value="resend-invitation" aria-label={`Resend the invitation to ${invitation.email}`}>
              Resend
            </Button>
          </Form>
          <Form method="post" preventScrollReset>
            <input type="hidden" name="invitationId" value={invitation.id} />
            <Button
              size="sm"
              variant="danger"
              name="intent"
              value="revoke-invitation"
              aria-label={`Revoke the invitation to ${invitation.email}`}
            >
              Revoke
            </Button>
          </Form>
        </div>
        {error ? <p className="mt-1 text-xs text-alert-300">{error}</p> : null}
      </td>
    </tr>
  );
}

export default function TeamMembers({ loaderData, actionData }: Route.ComponentProps) {
  const { team, role, me, members, invitations, linkDays } = loaderData;
  const result = actionData as MembersResult | undefined;
  const isOwner = role === "owner";
  // Every new answer puts the role menus back to the roles members really have (a refused change leaves none chosen).
  // A sent invitation empties the invite form for the next one (a refused one keeps what was typed).
  const [answers, setAnswers] = useState(0);
  const [invites, setInvites] = useState(0);
  const [seen, setSeen] = useState(result);
  if (result !== seen) {
    setSeen(result);
    setAnswers((n) => n + 1);
    if (result?.ok && result.intent === "invite") setInvites((n) => n + 1);
  }
  const rowError = (intent: string, subject: string) => {
    const errors = errorsFor(result, intent, subject);
    return errors ? Object.values(errors)[0] : undefined;
  };
  const inviteErrors = errorsFor(result, "invite");
  return (
    <div className="flex flex-col gap-8">
      <div>
        <Crumbs items={[{ label: "Home", to: "/" }, { label: team.name, to: `/teams/${team.id}` }, { label: "Members" }]} />
        <PageTitle
          title="Members and invitations"
          meta={
            <>
              <span>{team.name} · your role</span> <RoleBadge role={role} />
              <span className="text-ink-500">{ROLE_SUMMARY[role]}</span>
            </>
          }
        />
      </div>

      <Panel title={<Counted label="Members" count={members.length} />} id="members">
        <div className="mb-3">
          <ResultNotice result={result} intents={["change-role", "remove-member"]} />
        </div>
        <div className="overflow-x-auto">
          <table className={TABLE} data-testid="members-table">
            <thead className={THEAD}>
              <tr>
                <ColumnHeader label="Member" />
                <ColumnHeader label="E-mail" />
                <ColumnHeader label="Role" />
                <ColumnHeader label="Joined" />
                {isOwner ? <ActionsHeader /> : null}
              </tr>
            </thead>
            <tbody>
              {members.map((m) => (
                <MemberRow
                  key={m.userId}
                  member={m}
                  team={team}
                  me={me}
                  isOwner={isOwner}
                  resetKey={answers}
                  error={rowError("change-role", m.userId)}
                />
              ))}
            </tbody>
          </table>
        </div>
        <p className="mt-4 border-t border-ink-800 pt-4 text-sm text-ink-400">
          {isOwner
            ? "Owners change roles and remove members; the person is told by e-mail. A team always keeps at least one owner."
            : "Only owners change roles and invite people. Ask one if you need more (or less) access."}
        </p>
      </Panel>

      {isOwner && invitations ? (
        <Panel title={<Counted label="Invitations" count={invitations.length} />} id="invitations">
          <div className="mb-4">
            <ResultNotice result={result} intents={["invite", "resend-invitation", "revoke-invitation"]} />
          </div>
          <Form
            key={invites}
            method="post"
            preventScrollReset
            className="grid gap-3 md:grid-cols-[3fr_1fr_auto] md:items-start"
            aria-label="Invite someone"
            noValidate
          >
            <Field
              label="E-mail address"
              name="invite-email"
              error={inviteErrors?.email}
              hint={`The link works once, for ${linkDays} days. Whoever accepts it joins with the GitHub account they sign in with.`}
            >
              <TextInput
                id="invite-email"
                name="email"
                type="email"
                autoComplete="off"
                maxLength={EMAIL_MAX}
                required
                placeholder="name@example.com"
                error={inviteErrors?.email}
              />
            </Field>
            <Field label="Role" name="invite-role" error={inviteErrors?.role}>
              <Select id="invite-role" name="role" defaultValue="editor" error={inviteErrors?.role}>
                {ROLES.map((r) => (
                  <option key={r} value={r}>
                    {r}
                  </option>
                ))}
              </Select>
            </Field>
            <div className="md:pt-5">
              <Button variant="primary" name="intent" value="invite">
                Send invitation
              </Button>
            </div>
          </Form>

          <div className="mt-6">
            {invitations.length === 0 ? (
              <EmptyState title="No open invitations">
                Invitations that were sent and not yet used show here, to resend or revoke.
              </EmptyState>
            ) : (
              <div className="overflow-x-auto">
                <table className={TABLE} data-testid="invitations-table">
                  <thead className={THEAD}>
                    <tr>
                      <ColumnHeader label="Address" />
                      <ColumnHeader label="Role" />
                      <ColumnHeader label="Invited by" />
                      <ColumnHeader label="Sent" />
                      <ColumnHeader label="Link works" />
                      <ActionsHeader />
                    </tr>
                  </thead>
                  <tbody>
                    {invitations.map((i) => (
                      <InvitationRow
                        key={i.id}
                        invitation={i}
                        error={rowError("resend-invitation", i.id) ?? rowError("revoke-invitation", i.id)}
                      />
                    ))}
                  </tbody>
                </table>
              </div>
            )}
          </div>
        </Panel>
      ) : null}
    </div>
  );
}
