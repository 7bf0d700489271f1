import { redirect } from "react-router";
import type { Route } from "./+types/teams.new";
import { attempt, invalid } from "../actions.server.ts";
import { CreateTeamForm } from "../components/CreateTeamForm.tsx";
import { Crumbs, PageTitle, Panel } from "../components/ui.tsx";
import { db } from "../db.server.ts";
import { createTeamForm, newTeamStartersForm, parseForm } from "../forms.ts";
import { requireUser } from "../guards.server.ts";
import { readForm } from "../http.server.ts";
import { addStarterProfiles } from "../models/targetProfiles.server.ts";
import { createTeam } from "../models/teams.server.ts";

export const meta: Route.MetaFunction = () => [{ title: "Create a team · Skewsmith" }];

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request);
  return null;
}

/** Any signed-in person may create a team; they become its owner. Ticked starting profiles are added in the same transaction. */
export async function action({ request }: Route.ActionArgs) {
  const user = await requireUser(request);
  const form = await readForm(request);
  const parsed = parseForm(createTeamForm, form);
  const ticked = parseForm(newTeamStartersForm, form);
  if (!parsed.ok || !ticked.ok) return invalid("create-team", { ...(ticked.ok ? {} : ticked.errors), ...(parsed.ok ? {} : parsed.errors) });
  const starters = ticked.data.starter;
  let teamId = "";
  const result = await attempt("create-team", async () => {
    teamId = await db().transaction(async (tx) => {
      const team = await createTeam(tx, { name: parsed.data.name, ownerId: user.id });
      if (starters.length > 0) await addStarterProfiles(tx, { teamId: team.id, keys: starters, actorId: user.id });
      return team.id;
    });
  });
  if (teamId) throw redirect(`/teams/${teamId}`);
  return result;
}

export default function NewTeam({ actionData }: Route.ComponentProps) {
  const errors = actionData && !actionData.ok ? actionData.errors : undefined;
  return (
    <div className="flex max-w-2xl flex-col gap-6">
      <div>
        <Crumbs items={[{ label: "Home", to: "/" }, { label: "New team" }]} />
        <PageTitle title="Create a team" meta="A team holds projects, effects, sprites and target profiles, shared by role." />
      </div>
      <Panel title="Team" id="team-form">
        <CreateTeamForm errors={errors} />
      </Panel>
    </div>
  );
}
