import type { Route } from "./+types/team.profile.delete";
import { requireAtLeast } from "../actions.server.ts";
import { ConfirmPage } from "../components/ConfirmDialog.tsx";
import { DeleteProfileQuestion } from "../components/profiles/DeleteProfileQuestion.tsx";
import { db } from "../db.server.ts";
import { countProfileUsers } from "../models/targetProfiles.server.ts";
import { requireTeamProfile } from "../profiles/routes.server.ts";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Delete ${data?.profile.name ?? "target profile"}? · Skewsmith` }];

/** The question the delete dialog asks, as a page of its own for browsers without JavaScript. */
export async function loader({ request, params }: Route.LoaderArgs) {
  const { team, role, profile } = await requireTeamProfile(request, params.teamId, params.profileId, "viewer");
  requireAtLeast(role, "editor");
  return {
    team: { id: team.id, name: team.name },
    profile: { id: profile.id, name: profile.name, version: profile.version },
    users: await countProfileUsers(db(), profile.id),
  };
}

export default function DeleteProfile({ loaderData }: Route.ComponentProps) {
  const { team, profile, users } = loaderData;
  const back = `/teams/${team.id}/profiles/${profile.id}`;
  return (
    <ConfirmPage
      crumbs={[
        { label: "Home", to: "/" },
        { label: team.name, to: `/teams/${team.id}` },
        { label: "Target profiles", to: `/teams/${team.id}/profiles` },
        { label: profile.name, to: back },
        { label: "Delete" },
      ]}
      back={back}
      title={`Delete the target profile “${profile.name}”?`}
      confirm={users > 0 ? `Delete and detach ${users} effect${users === 1 ? "" : "s"}` : "Delete profile"}
      intent="delete-profile"
      fields={{ version: profile.version, effectCount: users }}
      action={back}
    >
      <DeleteProfileQuestion name={profile.name} users={users} />
    </ConfirmPage>
  );
}
