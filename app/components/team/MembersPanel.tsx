import { Link } from "react-router";
import type { Role } from "../../roles.ts";
import { buttonClass, Counted, Panel, RoleBadge } from "../ui.tsx";

export interface MemberSummaryView {
  userId: string;
  login: string;
  name: string | null;
  role: Role;
}

/**
 * The team page's members panel: who is in the team with which role, and the way to the members page where owners
 * invite, change roles and remove. `footer` holds what the team page adds (the Leave team button).
 */
export function MembersPanel({
  teamId,
  members,
  me,
  isOwner,
  openInvitations,
  footer,
}: {
  teamId: string;
  members: MemberSummaryView[];
  me: string;
  isOwner: boolean;
  /** Open invitations (owners only; null for others). */
  openInvitations: number | null;
  footer?: React.ReactNode;
}) {
  return (
    <Panel
      title={<Counted label="Members" count={members.length} />}
      id="members"
      actions={
        <Link to={`/teams/${teamId}/members`} className={buttonClass(isOwner ? "primary" : "secondary", "sm")}>
          {isOwner ? "Invite and manage members" : "See members"}
        </Link>
      }
    >
      <ul className="flex flex-wrap gap-2" data-testid="members-summary">
        {members.map((m) => (
          <li key={m.userId} className="flex items-center gap-2 rounded-md border border-ink-700 bg-ink-850 px-3 py-1.5 text-sm">
            <span className="text-ink-100">{m.name ?? m.login}</span>
            {m.userId === me ? <span className="text-xs text-ink-400">(you)</span> : null}
            <RoleBadge role={m.role} />
          </li>
        ))}
      </ul>
      {isOwner && openInvitations !== null ? (
        <p className="mt-3 text-sm text-ink-400">
          {openInvitations === 0 ? (
            "No invitation is waiting to be accepted."
          ) : (
            <>
              <span className="num">{openInvitations}</span> invitation{openInvitations === 1 ? " is" : "s are"} waiting to be accepted.
            </>
          )}
        </p>
      ) : null}
      {footer ? <div className="mt-4 border-t border-ink-800 pt-4">{footer}</div> : null}
    </Panel>
  );
}
