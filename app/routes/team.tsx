import { Form, Link, redirect } from "react-router";
import type { Route } from "./+types/team";
import { attempt, invalid, requireAtLeast, unknownIntent } from "../actions.server.ts";
import { ActivityList } from "../components/ActivityList.tsx";
import { InlineCreateForm } from "../components/InlineCreateForm.tsx";
import { ProfilesTable } from "../components/ProfilesTable.tsx";
import { RestoreList } from "../components/RestoreList.tsx";
import { MembersPanel } from "../components/team/MembersPanel.tsx";
import { useFormCheck } from "../components/useFormCheck.ts";
import {
  Button,
  buttonClass,
  Crumbs,
  EmptyState,
  Field,
  FormError,
  PageTitle,
  Panel,
  RoleBadge,
  SortHeader,
  TABLE,
  TCELL,
  TextArea,
  TextInput,
  THEAD,
  TROW,
  Timestamp,
} from "../components/ui.tsx";
import { db } from "../db.server.ts";
import { DESCRIPTION_MAX, errorsFor, NAME_MAX, parseForm, projectForm, renameTeamForm, restoreProjectForm } from "../forms.ts";
import { requireTeamRole } from "../guards.server.ts";
import { formText, readForm } from "../http.server.ts";
import { listActivity } from "../models/activity.server.ts";
import { listOpenInvitations } from "../models/invitations.server.ts";
import { createProject, listProjects, PROJECT_SORTS, restoreProject, type ProjectSort } from "../models/projects.server.ts";
import { listTargetProfiles } from "../models/targetProfiles.server.ts";
import { listMembers, removeMember, renameTeam } from "../models/teams.server.ts";
import { hasRole, ROLE_SUMMARY } from "../roles.ts";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.team.name ?? "Team"} · Skewsmith` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { user, team, role } = await requireTeamRole(request, params.teamId, "viewer");
  const url = new URL(request.url);
  const sortParam = url.searchParams.get("sort");
  const sort: ProjectSort = (PROJECT_SORTS as readonly string[]).includes(sortParam ?? "") ? (sortParam as ProjectSort) : "name";
  const dir = url.searchParams.get("dir") === "desc" ? "desc" : "asc";
  const [projects, archived, members, profiles, activity, invitations] = await Promise.all([
    listProjects(db(), team.id, { sort, dir }),
    listProjects(db(), team.id, { archived: true, sort: "changed", dir: "desc" }),
    listMembers(db(), team.id),
    listTargetProfiles(db(), team.id),
    listActivity(db(), { teamId: team.id }, 15),
    role === "owner" ? listOpenInvitations(db(), team.id) : Promise.resolve(null),
  ]);
  const openInvitations = invitations ? invitations.length : null;
  return { team, role, me: user.id, sort, dir, projects, archived, members, profiles, activity, openInvitations } as const;
}

export async function action({ request, params }: Route.ActionArgs) {
  const { user, team, role } = await requireTeamRole(request, params.teamId, "viewer");
  const form = await readForm(request);
  const intent = formText(form, "intent");
  switch (intent) {
    case "create-project": {
      requireAtLeast(role, "editor");
      const parsed = parseForm(projectForm, form);
      if (!parsed.ok) return invalid(intent, parsed.errors);
      let projectId = "";
      const result = await attempt(intent, async () => {
        projectId = (await createProject(db(), { teamId: team.id, ...parsed.data, actorId: user.id })).id;
      });
      if (projectId) throw redirect(`/projects/${projectId}`);
      return result;
    }
    case "restore-project": {
      requireAtLeast(role, "editor");
      const parsedId = parseForm(restoreProjectForm, form);
      if (!parsedId.ok) return invalid(intent, parsedId.errors, 400, formText(form, "projectId"));
      const projectId = parsedId.data.projectId;
      const owned = (await listProjects(db(), team.id, { archived: true })).some((p) => p.id === projectId);
      if (!owned) return invalid(intent, { form: "That archived project is not in this team." }, 404, projectId);
      return attempt(intent, () => restoreProject(db(), { projectId, actorId: user.id }), projectId);
    }
    case "rename-team": {
      requireAtLeast(role, "owner");
      const parsed = parseForm(renameTeamForm, form);
      if (!parsed.ok) return invalid(intent, parsed.errors);
      return attempt(intent, async () => {
        await renameTeam(db(), { teamId: team.id, name: parsed.data.name, expectedVersion: parsed.data.version, actorId: user.id });
      });
    }
    case "leave-team": {
      const result = await attempt(
        intent,
        async () => void (await removeMember(db(), { teamId: team.id, userId: user.id, actorId: user.id })),
      );
      if (result.data.ok) throw redirect("/");
      return result;
    }
    default:
      return unknownIntent(intent);
  }
}

export default function TeamPage({ loaderData, actionData }: Route.ComponentProps) {
  const { team, role, me, sort, dir, projects, archived, members, profiles, activity, openInvitations } = loaderData;
  const canEdit = hasRole(role, "editor");
  const isOwner = role === "owner";
  const createCheck = useFormCheck(projectForm);
  const createErrors = createCheck.errors ?? errorsFor(actionData, "create-project");
  const renameErrors = errorsFor(actionData, "rename-team");
  const leaveErrors = errorsFor(actionData, "leave-team");
  return (
    <div className="flex flex-col gap-8">
      <div>
        <Crumbs items={[{ label: "Home", to: "/" }, { label: team.name }]} />
        <PageTitle
          title={team.name}
          meta={
            <>
              <span>Your role</span> <RoleBadge role={role} /> <span className="text-ink-500">{ROLE_SUMMARY[role]}</span>
            </>
          }
        />
        {isOwner ? (
          <details className="group max-w-xl" open={renameErrors !== undefined}>
            <summary className="cursor-pointer text-sm text-ink-400 hover:text-ink-200">Rename team</summary>
            <Form method="post" className="mt-3 flex items-end gap-3">
              <div className="flex-1">
                <input type="hidden" name="version" value={team.version} />
                <Field label="Team name" name="team-name" error={renameErrors?.name ?? renameErrors?.version ?? renameErrors?.form}>
                  <TextInput id="team-name" name="name" defaultValue={team.name} maxLength={NAME_MAX} required error={renameErrors?.name} />
                </Field>
              </div>
              <Button name="intent" value="rename-team">
                Save name
              </Button>
            </Form>
          </details>
        ) : null}
      </div>

      <Panel title="Projects" id="projects">
        {projects.length === 0 ? (
          <EmptyState title="No projects yet">
            {canEdit
              ? "Create the team's first project below: it will hold effects, sprites and the target profiles they use."
              : "When an editor or owner creates a project, it shows up here."}
          </EmptyState>
        ) : (
          <table className={TABLE} data-testid="projects-table">
            <thead className={THEAD}>
              <tr>
                <SortHeader label="Project" sort="name" current={sort} dir={dir} />
                <SortHeader label="Effects" sort="effects" current={sort} dir={dir} align="right" />
                <SortHeader label="Last change" sort="changed" current={sort} dir={dir} />
              </tr>
            </thead>
            <tbody>
              {projects.map((p) => (
                <tr key={p.id} className={TROW}>
                  <td className={TCELL}>
                    <Link to={`/projects/${p.id}`} className="font-medium text-ink-100 hover:text-glass-300">
                      {p.name}
                    </Link>
                    {p.description ? <div className="line-clamp-1 text-xs text-ink-400">{p.description}</div> : null}
                  </td>
                  <td className={`${TCELL} num text-right`}>{p.effectCount}</td>
                  <td className={TCELL}>
                    <Timestamp value={p.lastChangedAt} />
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        )}

        {canEdit ? (
          <InlineCreateForm
            label="New project"
            columns="md:grid-cols-[1fr_2fr_auto]"
            intent="create-project"
            submit="Create project"
            onSubmit={createCheck.onSubmit}
            formError={createErrors?.form}
          >
            <Field label="New project name" name="name" error={createErrors?.name}>
              <TextInput name="name" maxLength={NAME_MAX} required placeholder="Say, Harbour level" error={createErrors?.name} />
            </Field>
            <Field label="Description (optional)" name="description" error={createErrors?.description}>
              <TextArea
                name="description"
                rows={1}
                maxLength={DESCRIPTION_MAX}
                placeholder="What the project is for"
                error={createErrors?.description}
              />
            </Field>
          </InlineCreateForm>
        ) : null}

        <RestoreList
          title="Archived projects"
          verb="archived"
          items={archived.map((p) => ({ id: p.id, name: p.name, at: p.archivedAt!, to: `/projects/${p.id}` }))}
          idField="projectId"
          intent="restore-project"
          canRestore={canEdit}
          open={errorsFor(actionData, "restore-project") !== undefined}
          errorOf={(id) => {
            const errors = errorsFor(actionData, "restore-project", id);
            return errors ? Object.values(errors)[0] : undefined;
          }}
        />
      </Panel>

      <MembersPanel
        teamId={team.id}
        members={members}
        me={me}
        isOwner={isOwner}
        openInvitations={openInvitations}
        footer={
          <div className="flex flex-wrap items-center justify-between gap-3 text-sm text-ink-400">
            <p>Leaving ends your own access; the team's work stays.</p>
            <Form method="post">
              <Button size="sm" variant="danger" name="intent" value="leave-team">
                Leave team
              </Button>
            </Form>
            <div className="w-full">
              <FormError>{leaveErrors?.form}</FormError>
            </div>
          </div>
        }
      />

      <Panel
        title="Target profiles"
        id="profiles"
        actions={
          <Link to={`/teams/${team.id}/profiles`} className={buttonClass("secondary", "sm")}>
            {canEdit ? "Manage target profiles" : "See target profiles"}
          </Link>
        }
      >
        <p className="mb-3 text-sm text-ink-400">
          Shared presets of canvas, arithmetic and export settings; every project of the team can use them.
        </p>
        <ProfilesTable
          profiles={profiles}
          teamId={team.id}
          emptyHint={
            canEdit
              ? "Open the profiles page to add starting profiles by screen size and CPU family, or make your own."
              : "Editors and owners can create them."
          }
        />
      </Panel>

      <Panel title="Recent activity" id="activity">
        <ActivityList items={activity} />
      </Panel>
    </div>
  );
}
