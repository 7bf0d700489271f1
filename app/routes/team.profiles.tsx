import { Form, Link, redirect } from "react-router";
import type { Route } from "./+types/team.profiles";
import { attempt, invalid, requireAtLeast, unknownIntent } from "../actions.server.ts";
import { ActivityList } from "../components/ActivityList.tsx";
import { ProfilesTable } from "../components/ProfilesTable.tsx";
import { buttonClass, Button, Crumbs, FormError, Notice, PageTitle, Panel } from "../components/ui.tsx";
import { db } from "../db.server.ts";
import { addStartersForm, duplicateProfileForm, errorsFor, parseForm } from "../forms.ts";
import { requireTeamRole } from "../guards.server.ts";
import { formText, readForm } from "../http.server.ts";
import { listTeamActivityOfKind } from "../models/activity.server.ts";
import { addStarterProfiles, duplicateTargetProfile, listTargetProfiles } from "../models/targetProfiles.server.ts";
import { STARTER_PROFILES } from "../profiles/starters.ts";
import { hasRole } from "../roles.ts";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Target profiles · ${data?.team.name ?? "Team"} · Skewsmith` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { team, role } = await requireTeamRole(request, params.teamId, "viewer");
  const [profiles, changes] = await Promise.all([listTargetProfiles(db(), team.id), listTeamActivityOfKind(db(), team.id, "profiles", 8)]);
  const names = new Set(profiles.map((p) => p.name.toLowerCase()));
  const starters = STARTER_PROFILES.filter((s) => !names.has(s.settings.name.toLowerCase())).map((s) => ({
    key: s.key,
    name: s.settings.name,
    description: s.settings.description,
  }));
  return { team: { id: team.id, name: team.name }, role, profiles, starters, changes };
}

/** Adding starting profiles and duplicating need an editor (or owner); viewers use profiles but change none. */
export async function action({ request, params }: Route.ActionArgs) {
  const { user, team, role } = await requireTeamRole(request, params.teamId, "viewer");
  requireAtLeast(role, "editor");
  const form = await readForm(request);
  const intent = formText(form, "intent");
  switch (intent) {
    case "add-starters": {
      const parsed = parseForm(addStartersForm, form);
      if (!parsed.ok) return invalid(intent, parsed.errors);
      return attempt(intent, async () => {
        const added = await addStarterProfiles(db(), { teamId: team.id, keys: parsed.data.starter, actorId: user.id });
        return added.length ? `Added ${added.join("; ")}.` : "The team already has profiles with those names; nothing was added.";
      });
    }
    case "duplicate-profile": {
      const parsed = parseForm(duplicateProfileForm, form);
      if (!parsed.ok) return invalid(intent, parsed.errors);
      let copyId = "";
      const result = await attempt(intent, async () => {
        copyId = (await duplicateTargetProfile(db(), { teamId: team.id, profileId: parsed.data.profileId, actorId: user.id })).id;
      });
      if (copyId) throw redirect(`/teams/${team.id}/profiles/${copyId}`);
      return result;
    }
    default:
      return unknownIntent(intent);
  }
}

export default function TeamProfiles({ loaderData, actionData }: Route.ComponentProps) {
  const { team, role, profiles, starters, changes } = loaderData;
  const canEdit = hasRole(role, "editor");
  const starterErrors = errorsFor(actionData, "add-starters");
  const duplicateErrors = errorsFor(actionData, "duplicate-profile");
  const added = actionData?.ok && actionData.intent === "add-starters" ? actionData.message : undefined;
  return (
    <div className="flex flex-col gap-8">
      <div>
        <Crumbs items={[{ label: "Home", to: "/" }, { label: team.name, to: `/teams/${team.id}` }, { label: "Target profiles" }]} />
        <PageTitle
          title="Target profiles"
          meta={`Shared presets of ${team.name}: canvas, arithmetic and export settings that effects follow.`}
          actions={
            canEdit ? (
              <Link to={`/teams/${team.id}/profiles/new`} className={buttonClass("primary")}>
                New target profile
              </Link>
            ) : null
          }
        />
        {added ? <Notice>{added}</Notice> : null}
      </div>

      <Panel title="Profiles" id="profiles">
        <ProfilesTable
          profiles={profiles}
          teamId={team.id}
          emptyHint={
            canEdit
              ? "Add some of the starting profiles below, or make a new one."
              : "Editors and owners create them; you can then use them."
          }
        />
        <FormError>{duplicateErrors ? Object.values(duplicateErrors).join(" ") : undefined}</FormError>
        {!canEdit ? <p className="mt-3 text-sm text-ink-400">Viewers use target profiles; editors and owners change them.</p> : null}
      </Panel>

      {canEdit && starters.length > 0 ? (
        <Panel title="Starting profiles" id="starters">
          <p className="mb-3 text-sm text-ink-400">
            Generic presets by screen size and CPU family. Their hardware values are from memory: check them against your target's
            documentation, then edit the copy the team gets.
          </p>
          <Form method="post" className="flex flex-col gap-3" aria-label="Add starting profiles">
            <ul className="grid gap-2 md:grid-cols-2">
              {starters.map((s) => (
                <li key={s.key} className="flex flex-col gap-1 rounded-md border border-ink-700 bg-ink-850 px-3 py-2.5 text-sm">
                  <label className="flex items-start gap-3">
                    <input type="checkbox" name="starter" value={s.key} className="mt-1 accent-glass-400" />
                    <span>
                      <span className="num font-medium text-ink-100">{s.name}</span>
                      <span className="block text-xs text-ink-400">{s.description}</span>
                    </span>
                  </label>
                  <Link to={`/teams/${team.id}/profiles/new?starter=${s.key}`} className="ml-7 text-xs text-glass-300 hover:underline">
                    Start a new profile from this one
                  </Link>
                </li>
              ))}
            </ul>
            <div>
              <Button name="intent" value="add-starters">
                Add the ticked profiles
              </Button>
            </div>
            <FormError>{starterErrors?.starter ?? starterErrors?.form}</FormError>
          </Form>
        </Panel>
      ) : null}

      <Panel title="Recent profile changes" id="profile-changes">
        <ActivityList items={changes} />
      </Panel>
    </div>
  );
}
