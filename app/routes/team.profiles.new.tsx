import { data, redirect } from "react-router";
import type { Route } from "./+types/team.profiles.new";
import { attempt, requireAtLeast, unknownIntent } from "../actions.server.ts";
import { ProfileForm } from "../components/profiles/ProfileForm.tsx";
import { Crumbs, PageTitle, Panel } from "../components/ui.tsx";
import { db } from "../db.server.ts";
import { errorsFor } from "../forms.ts";
import { requireTeamRole } from "../guards.server.ts";
import { readForm } from "../http.server.ts";
import { createTargetProfile } from "../models/targetProfiles.server.ts";
import { profileFormShapeErrors, profileFormValues, type ProfileFormValues } from "../profiles/form.ts";
import { profileFormOptions } from "../profiles/options.ts";
import { starterProfile } from "../profiles/starters.ts";
import { BLANK_PROFILE, profileValues } from "../profiles/values.ts";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `New target profile · ${data?.team.name ?? "Team"} · Skewsmith` }];

/** `?starter=KEY` starts from one of the generic starting profiles; an unknown key is a 400 naming the known ones. */
export async function loader({ request, params }: Route.LoaderArgs) {
  const { team, role } = await requireTeamRole(request, params.teamId, "editor");
  const key = new URL(request.url).searchParams.get("starter");
  let values: ProfileFormValues = BLANK_PROFILE;
  let from: string | null = null;
  if (key !== null) {
    const starter = starterProfile(key);
    if (!starter)
      throw data(
        { message: `There is no starting profile “${key.slice(0, 60)}”. Pick one from the team's profiles page.` },
        { status: 400 },
      );
    values = profileValues(starter.settings);
    from = starter.settings.name;
  }
  return { team: { id: team.id, name: team.name }, role, values, from, options: profileFormOptions() };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { user, team, role } = await requireTeamRole(request, params.teamId, "viewer");
  requireAtLeast(role, "editor");
  const form = await readForm(request);
  const intent = String(form.get("intent") ?? "");
  if (intent !== "create-profile") return unknownIntent(intent);
  const values = profileFormValues(form);
  const shapeErrors = profileFormShapeErrors(form);
  if (Object.keys(shapeErrors).length > 0) return data({ ok: false, intent, errors: shapeErrors, values }, { status: 400 });
  let profileId = "";
  const result = await attempt(intent, async () => {
    profileId = (await createTargetProfile(db(), { ...values, teamId: team.id, actorId: user.id })).id;
  });
  if (profileId) throw redirect(`/teams/${team.id}/profiles/${profileId}`);
  // Send the entries back, so a page shown without JavaScript keeps what the person typed.
  return data({ ...result.data, values }, { status: result.init?.status ?? 400 });
}

export default function NewProfile({ loaderData, actionData }: Route.ComponentProps) {
  const { team, values, from, options } = loaderData;
  const errors = errorsFor(actionData, "create-profile");
  const shown = actionData && "values" in actionData ? (actionData.values as ProfileFormValues) : values;
  return (
    <div className="flex flex-col gap-6">
      <div>
        <Crumbs
          items={[
            { label: "Home", to: "/" },
            { label: team.name, to: `/teams/${team.id}` },
            { label: "Target profiles", to: `/teams/${team.id}/profiles` },
            { label: "New" },
          ]}
        />
        <PageTitle
          title="New target profile"
          meta={
            from
              ? `Starting from “${from}”: its hardware values are from memory, so check them.`
              : "A preset the team's effects can follow."
          }
        />
      </div>
      <Panel title="Settings" id="settings">
        <ProfileForm
          key={JSON.stringify(shown)}
          values={shown}
          options={options}
          errors={errors}
          intent="create-profile"
          submit="Create target profile"
        />
      </Panel>
    </div>
  );
}
