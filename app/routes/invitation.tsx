import { data, Form, Link, redirect } from "react-router";
import type { Route } from "./+types/invitation";
import { buttonClass, FormError, LogoMark, RoleBadge, Timestamp } from "../components/ui.tsx";
import { db } from "../db.server.ts";
import { getUserFromRequest, requireUser } from "../guards.server.ts";
import { readForm } from "../http.server.ts";
import { acceptInvitation, findInvitationByToken, InvitationUnusable } from "../models/invitations.server.ts";
import { getRole } from "../models/teams.server.ts";
import { limitInvitation } from "../rateLimit.server.ts";
import { displayName } from "../models/users.server.ts";
import { ROLE_SUMMARY, type Role } from "../roles.ts";

export const meta: Route.MetaFunction = ({ data }) => [
  { title: data && data.state === "pending" ? `Join ${data.teamName} · Skewsmith` : "Invitation · Skewsmith" },
  // The address holds a secret: keep it out of other sites' Referer headers and out of search engines.
  { name: "referrer", content: "no-referrer" },
  { name: "robots", content: "noindex" },
];

type Closed = {
  state: "expired" | "accepted" | "revoked";
  teamName: string;
  email: string;
  at: Date;
  byYou: boolean;
  teamId: string | null;
};

/**
 * A link that cannot be used (unknown, expired, used, revoked) gets a page of its own, without signing in: 404 for
 * an unknown link, 410 for one that worked once. A usable link needs a signed-in person first; sign-in comes back here.
 */
export async function loader({ request, params }: Route.LoaderArgs) {
  await limitInvitation(request);
  const invitation = await findInvitationByToken(db(), params.token);
  if (!invitation) return data({ state: "unknown" as const }, { status: 404 });
  if (invitation.status !== "pending") {
    const viewer = await getUserFromRequest(request);
    const member = viewer ? await getRole(db(), invitation.teamId, viewer.id) : null;
    const at =
      invitation.status === "accepted"
        ? invitation.acceptedAt!
        : invitation.status === "revoked"
          ? invitation.revokedAt!
          : invitation.expiresAt;
    const closed: Closed = {
      state: invitation.status,
      teamName: invitation.teamName,
      email: invitation.email,
      at,
      // Who used it is shown only to that person.
      byYou: invitation.status === "accepted" && viewer !== null && invitation.acceptedById === viewer.id,
      teamId: member ? invitation.teamId : null,
    };
    return data(closed, { status: 410 });
  }
  const user = await requireUser(request);
  const role = await getRole(db(), invitation.teamId, user.id);
  return {
    state: "pending" as const,
    teamId: invitation.teamId,
    teamName: invitation.teamName,
    email: invitation.email,
    role: invitation.role,
    invitedBy: invitation.invitedBy,
    expiresAt: invitation.expiresAt,
    you: { name: displayName(user), login: user.login, email: user.email },
    memberAs: role,
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  await limitInvitation(request);
  const user = await requireUser(request);
  await readForm(request);
  try {
    const { teamId } = await acceptInvitation(db(), { token: params.token, userId: user.id });
    throw redirect(`/teams/${teamId}`);
  } catch (error) {
    if (error instanceof InvitationUnusable) return data({ refused: error.message }, { status: error.status });
    throw error;
  }
}

const article = (role: Role) => (role === "owner" ? "an owner" : `an ${role}`);

function Card({ title, children }: { title: string; children: React.ReactNode }) {
  return (
    <div className="mx-auto mt-8 max-w-lg">
      <div className="rounded-xl border border-ink-700 bg-ink-900 px-8 py-9">
        <LogoMark className="h-10 w-10" />
        <h1 className="mt-4 text-2xl font-semibold tracking-tight">{title}</h1>
        <div className="mt-3 flex flex-col gap-3 text-sm text-ink-300">{children}</div>
      </div>
    </div>
  );
}

const CLOSED_TITLE = {
  expired: "This invitation has expired",
  accepted: "This invitation was already used",
  revoked: "This invitation was revoked",
};

export default function InvitationPage({ loaderData, actionData, params }: Route.ComponentProps) {
  const refused = actionData && "refused" in actionData ? actionData.refused : undefined;
  if (loaderData.state === "unknown")
    return (
      <Card title="This invitation link is not valid">
        <p>
          No invitation has this link. It may have been copied incompletely, or replaced: when an owner sends an invitation again, only the
          link in the newest e-mail works.
        </p>
        <p>Ask an owner of the team to invite you again.</p>
      </Card>
    );
  if (loaderData.state !== "pending") {
    const closed = loaderData as Closed;
    return (
      <Card title={CLOSED_TITLE[closed.state]}>
        <p>
          The invitation to <span className="num text-ink-100">{closed.email}</span> to join{" "}
          <strong className="text-ink-100">{closed.teamName}</strong>{" "}
          {closed.state === "expired" ? "stopped working on" : closed.state === "accepted" ? "was used on" : "was revoked on"}{" "}
          <Timestamp value={closed.at} />
          {closed.byYou ? " (by you)" : ""}. An invitation link works once, for seven days.
        </p>
        {closed.teamId ? (
          <p>
            You are a member of {closed.teamName}:{" "}
            <Link to={`/teams/${closed.teamId}`} className="text-glass-300 hover:underline">
              open the team
            </Link>
            .
          </p>
        ) : (
          <p>
            {closed.state === "accepted"
              ? "If someone else used your link, tell an owner of the team; they can remove that member and invite you again."
              : "Ask an owner of the team to send a new invitation."}
          </p>
        )}
      </Card>
    );
  }
  const inv = loaderData;
  const sameAddress = inv.you.email !== null && inv.you.email.toLowerCase() === inv.email.toLowerCase();
  return (
    <Card title={`Join ${inv.teamName}`}>
      <p>
        {inv.invitedBy ?? "An owner"} invited <span className="num text-ink-100">{inv.email}</span> to join{" "}
        <strong className="text-ink-100">{inv.teamName}</strong> as <RoleBadge role={inv.role} />. {ROLE_SUMMARY[inv.role]}
      </p>
      <div className="rounded-md border border-ink-700 bg-ink-850 px-4 py-3" data-testid="accepting-as">
        <p className="text-xs uppercase tracking-wide text-ink-400">Accepting as</p>
        <p className="mt-1 text-ink-100">
          {inv.you.name} <span className="num text-ink-500">@{inv.you.login}</span>
        </p>
        <p className="num text-xs text-ink-400">{inv.you.email ?? "no e-mail address shared"}</p>
        {!sameAddress ? (
          <p className="mt-2 text-ink-300">
            This account's address is not the invited one. You can still accept: the team gets the account you are signed in with. If
            someone else should join, sign out and sign in with their GitHub account.
          </p>
        ) : null}
      </div>
      <FormError>{refused}</FormError>
      {inv.memberAs ? (
        <p>
          You are already a member of {inv.teamName} (as {article(inv.memberAs)}), so this invitation is not needed; it stays unused.{" "}
          <Link to={`/teams/${inv.teamId}`} className="text-glass-300 hover:underline">
            Open the team
          </Link>
          .
        </p>
      ) : (
        <>
          <p>
            The link works once, until <Timestamp value={inv.expiresAt} />.
          </p>
          <Form method="post" className="flex flex-wrap items-center gap-3">
            <button type="submit" className={buttonClass("primary") + " py-2.5"}>
              Join {inv.teamName} as {article(inv.role)}
            </button>
          </Form>
        </>
      )}
      <Form method="post" action="/sign-out" reloadDocument>
        <input type="hidden" name="next" value={`/invitations/${params.token}`} />
        <button type="submit" className={buttonClass("quiet", "sm")}>
          Sign out and use another account
        </button>
      </Form>
    </Card>
  );
}
