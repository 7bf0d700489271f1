import { data } from "react-router";
import type { Route } from "./+types/team.members.remove";
import { requireAtLeast } from "../actions.server.ts";
import { ConfirmPage } from "../components/ConfirmDialog.tsx";
import { RemoveMemberQuestion } from "../components/team/RemoveMemberQuestion.tsx";
import { db } from "../db.server.ts";
import { requireTeamRole } from "../guards.server.ts";
import { listMembers } from "../models/teams.server.ts";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Remove ${data?.member.name ?? "member"}? · Skewsmith` }];

/** The question the Remove dialog asks, as a page of its own for browsers without JavaScript. */
export async function loader({ request, params }: Route.LoaderArgs) {
  const { user, team, role } = await requireTeamRole(request, params.teamId, "viewer");
  requireAtLeast(role, "owner");
  const member = (await listMembers(db(), team.id)).find((m) => m.userId === params.userId);
  if (!member) throw data({ message: "That person is not a member of this team." }, { status: 404 });
  if (member.userId === user.id) throw data({ message: "To leave the team yourself, use Leave team on the team's page." }, { status: 400 });
  return {
    team: { id: team.id, name: team.name },
    member: { userId: member.userId, name: member.name ?? member.login, email: member.email, role: member.role },
  };
}

export default function RemoveMember({ loaderData }: Route.ComponentProps) {
  const { team, member } = loaderData;
  const back = `/teams/${team.id}/members`;
  return (
    <ConfirmPage
      crumbs={[
        { label: "Home", to: "/" },
        { label: team.name, to: `/teams/${team.id}` },
        { label: "Members", to: back },
        { label: "Remove" },
      ]}
      back={back}
      title={`Remove ${member.name} from ${team.name}?`}
      confirm={`Remove ${member.name}`}
      intent="remove-member"
      fields={{ userId: member.userId }}
      action={back}
    >
      <RemoveMemberQuestion name={member.name} email={member.email} role={member.role} teamName={team.name} />
    </ConfirmPage>
  );
}
