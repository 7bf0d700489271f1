import { data, Form, Link, redirect } from "react-router";
import type { Route } from "./+types/team.profile";
import { attempt, invalid, requireAtLeast, unknownIntent } from "../actions.server.ts";
import { ConfirmDialog } from "../components/ConfirmDialog.tsx";
import { DeleteProfileQuestion } from "../components/profiles/DeleteProfileQuestion.tsx";
import { ProfileForm } from "../components/profiles/ProfileForm.tsx";
import {
  Button,
  ColumnHeader,
  Counted,
  Crumbs,
  EmptyState,
  FormError,
  Notice,
  PageTitle,
  Panel,
  TABLE,
  TCELL,
  THEAD,
  TROW,
  Timestamp,
} from "../components/ui.tsx";
import { db } from "../db.server.ts";
import { qNotation } from "../effects/display.ts";
import { deleteProfileForm, errorsFor, parseForm, type ActionResult } from "../forms.ts";
import { formText, readForm } from "../http.server.ts";
import {
  countProfileUsers,
  deleteTargetProfile,
  duplicateTargetProfile,
  listProfileEffects,
  updateTargetProfile,
} from "../models/targetProfiles.server.ts";
import { profileFormShapeErrors, profileFormValues, type ProfileFormValues } from "../profiles/form.ts";
import { profileFormOptions } from "../profiles/options.ts";
import { requireTeamProfile } from "../profiles/routes.server.ts";
import { profileValues } from "../profiles/values.ts";
import { hasRole } from "../roles.ts";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.profile.name ?? "Target profile"} · Skewsmith` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { team, role, profile } = await requireTeamProfile(request, params.teamId, params.profileId, "viewer");
  const [effects, users] = await Promise.all([listProfileEffects(db(), profile.id), countProfileUsers(db(), profile.id)]);
  return {
    team: { id: team.id, name: team.name },
    role,
    profile: { id: profile.id, name: profile.name, version: profile.version, updatedAt: profile.updatedAt },
    values: profileValues(profile),
    summary: `${profile.canvasWidth} × ${profile.canvasHeight}, ${qNotation({ bits: profile.fixedPointBits, fraction: profile.fixedPointFraction })}`,
    effects,
    users,
    options: profileFormOptions(),
  };
}

/** A whole number sent by the page (a version, a count); null when it is not one. */
function wholeField(form: FormData, name: string): number | null {
  const text = formText(form, name);
  return /^\d{1,9}$/.test(text) ? Number(text) : null;
}

type SaveResult = ActionResult & { values?: ProfileFormValues; startedFrom?: number; stale?: boolean };

export async function action({ request, params }: Route.ActionArgs) {
  const { user, team, role, profile } = await requireTeamProfile(request, params.teamId, params.profileId, "viewer");
  requireAtLeast(role, "editor");
  const form = await readForm(request);
  const intent = formText(form, "intent");
  switch (intent) {
    case "save-profile": {
      const values = profileFormValues(form);
      const shapeErrors = profileFormShapeErrors(form);
      if (Object.keys(shapeErrors).length > 0) return data<SaveResult>({ ok: false, intent, errors: shapeErrors, values }, { status: 400 });
      const expectedVersion = wholeField(form, "version");
      if (expectedVersion === null)
        return data<SaveResult>(
          { ok: false, intent, errors: { form: "The form did not say which version it started from; reload the page." }, values },
          { status: 400 },
        );
      const result = await attempt(intent, async () => {
        const saved = await updateTargetProfile(db(), {
          ...values,
          teamId: team.id,
          profileId: profile.id,
          expectedVersion,
          actorId: user.id,
        });
        if (saved.changes.length === 0) return "Nothing changed, so nothing was saved.";
        const flowed =
          saved.effectsUpdated > 0
            ? ` ${saved.effectsUpdated} following effect${saved.effectsUpdated === 1 ? " was" : "s were"} updated, each with a new version.`
            : "";
        return `Saved version ${saved.profile.version}.${flowed}`;
      });
      if (result.data.ok) return result;
      const status = result.init?.status ?? 400;
      return data<SaveResult>({ ...result.data, values, startedFrom: expectedVersion, stale: status === 409 }, { status });
    }
    case "duplicate-profile": {
      let copyId = "";
      const result = await attempt(intent, async () => {
        copyId = (await duplicateTargetProfile(db(), { teamId: team.id, profileId: profile.id, actorId: user.id })).id;
      });
      if (copyId) throw redirect(`/teams/${team.id}/profiles/${copyId}`);
      return result;
    }
    case "delete-profile": {
      const parsed = parseForm(deleteProfileForm, form);
      // The fields are the confirmation's own (hidden): their messages show together on the form.
      if (!parsed.ok) return invalid(intent, { ...parsed.errors, form: [...new Set(Object.values(parsed.errors))].join(" ") });
      const { version: expectedVersion, effectCount: expectedEffectCount } = parsed.data;
      let deleted = false;
      const result = await attempt(intent, async () => {
        await deleteTargetProfile(db(), { teamId: team.id, profileId: profile.id, expectedVersion, expectedEffectCount, actorId: user.id });
        deleted = true;
      });
      if (deleted) throw redirect(`/teams/${team.id}/profiles`);
      return result;
    }
    default:
      return unknownIntent(intent);
  }
}

export default function ProfilePage({ loaderData, actionData }: Route.ComponentProps) {
  const { team, role, profile, values, summary, effects, users, options } = loaderData;
  const canEdit = hasRole(role, "editor");
  const result = actionData as SaveResult | undefined;
  const failedSave = result && !result.ok && result.intent === "save-profile" ? result : undefined;
  const saved = result?.ok && result.intent === "save-profile" ? result.message : undefined;
  // After a refused save the form keeps what the person typed and the version they started from, so saving again
  // cannot overwrite someone else's change without a reload.
  const shown = failedSave?.values ?? values;
  const startedFrom = failedSave?.startedFrom ?? profile.version;
  const following = effects.filter((e) => e.followsProfile).length;
  const deleteErrors = errorsFor(actionData, "delete-profile");
  const base = `/teams/${team.id}/profiles/${profile.id}`;
  return (
    <div className="flex flex-col gap-8">
      <div>
        <Crumbs
          items={[
            { label: "Home", to: "/" },
            { label: team.name, to: `/teams/${team.id}` },
            { label: "Target profiles", to: `/teams/${team.id}/profiles` },
            { label: profile.name },
          ]}
        />
        <PageTitle
          title={profile.name}
          meta={
            <>
              <span className="num">{summary}</span>
              <span>·</span>
              <span>
                version <span className="num">{profile.version}</span>, changed <Timestamp value={profile.updatedAt} />
              </span>
            </>
          }
          actions={
            canEdit ? (
              <>
                <Form method="post">
                  <Button name="intent" value="duplicate-profile">
                    Duplicate
                  </Button>
                </Form>
                <ConfirmDialog
                  trigger="Delete"
                  triggerLabel={`Delete ${profile.name}`}
                  size="md"
                  confirmPage={`${base}/delete`}
                  title={`Delete the target profile “${profile.name}”?`}
                  confirm={users > 0 ? `Delete and detach ${users} effect${users === 1 ? "" : "s"}` : "Delete profile"}
                  intent="delete-profile"
                  fields={{ version: profile.version, effectCount: users }}
                >
                  <DeleteProfileQuestion name={profile.name} users={users} />
                </ConfirmDialog>
              </>
            ) : null
          }
        />
        <div className="flex flex-col gap-3">
          {saved ? <Notice>{saved}</Notice> : null}
          <FormError>{deleteErrors?.form ?? errorsFor(actionData, "duplicate-profile")?.form}</FormError>
          {failedSave?.stale ? (
            <p className="text-sm text-ink-300">
              <Link to={base} reloadDocument className="text-glass-300 underline-offset-2 hover:underline">
                Reload the profile
              </Link>{" "}
              to see the saved version; what you entered below is not saved, so note it first.
            </p>
          ) : null}
        </div>
      </div>

      <Panel title="Settings" id="settings">
        {!canEdit ? <p className="mb-4 text-sm text-ink-400">Viewers use target profiles; editors and owners change them.</p> : null}
        <ProfileForm
          key={`${startedFrom}-${failedSave ? JSON.stringify(shown) : ""}`}
          values={shown}
          options={options}
          errors={failedSave?.errors}
          intent="save-profile"
          submit="Save profile"
          readOnly={!canEdit}
          hidden={{ version: startedFrom }}
          aside={
            following > 0
              ? `Saving updates the ${following} effect${following === 1 ? "" : "s"} that follow${following === 1 ? "s" : ""} this profile.`
              : "No effect follows this profile yet."
          }
        />
      </Panel>

      <Panel title={<Counted label="Effects using this profile" count={effects.length} />} id="effects">
        {effects.length === 0 ? (
          <EmptyState title="No effect uses this profile">Choose it as the target profile when creating an effect in a project.</EmptyState>
        ) : (
          <div className="overflow-x-auto">
            <table className={TABLE} data-testid="profile-effects">
              <thead className={THEAD}>
                <tr>
                  <ColumnHeader label="Effect" />
                  <ColumnHeader label="Project" />
                  <ColumnHeader label="Settings" />
                  <ColumnHeader label="Version" align="right" />
                </tr>
              </thead>
              <tbody>
                {effects.map((e) => (
                  <tr key={e.id} className={TROW} data-testid={`profile-effect-${e.name}`}>
                    <td className={TCELL}>
                      <Link to={`/effects/${e.id}`} className="font-medium text-ink-100 hover:text-glass-300">
                        {e.name}
                      </Link>
                    </td>
                    <td className={TCELL}>
                      <Link to={`/projects/${e.projectId}`} className="text-ink-300 hover:text-glass-300">
                        {e.projectName}
                      </Link>
                      {e.projectArchived ? <span className="ml-2 text-xs text-ink-500">archived</span> : null}
                    </td>
                    <td className={`${TCELL} text-ink-300`}>
                      {e.followsProfile ? "follows the profile" : <span className="text-ink-400">detached: keeps its own</span>}
                    </td>
                    <td className={`${TCELL} num text-right`}>v{e.version}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
      </Panel>
    </div>
  );
}
