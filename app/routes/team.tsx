import { useState } from "react";
import { Form, Link, redirect, useFetcher } from "react-router";
import type { Route } from "./+types/team";
import { attempt, invalid, requireAtLeast, unknownIntent } from "../actions.server.ts";
import { ActivityList } from "../components/ActivityList.tsx";
import { InlineCreateForm } from "../components/InlineCreateForm.tsx";
import { ProfilesTable } from "../components/ProfilesTable.tsx";
import { RestoreList } from "../components/RestoreList.tsx";
import { useFormCheck } from "../components/useFormCheck.ts";
import {
  ActionsHeader,
  Button,
  ColumnHeader,
  Counted,
  Crumbs,
  Notice,
  EmptyState,
  Field,
  FormError,
  PageTitle,
  Panel,
  RoleBadge,
  Select,
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
import {
  changeRoleForm,
  DESCRIPTION_MAX,
  errorsFor,
  memberForm,
  NAME_MAX,
  parseForm,
  projectForm,
  renameTeamForm,
  restoreProjectForm,
  type ActionResult,
} from "../forms.ts";
import { requireTeamRole } from "../guards.server.ts";
import { formText, readForm } from "../http.server.ts";
import { listActivity } from "../models/activity.server.ts";
import { createProject, listProjects, PROJECT_SORTS, restoreProject, type ProjectSort } from "../models/projects.server.ts";
import { createTargetProfile, listTargetProfiles } from "../models/targetProfiles.server.ts";
import { EDGES, HALF_TURNS, LIMITS, ROUNDINGS } from "@skewsmith/core";
import { targetProfileInput } from "../effects/settings.ts";
import { changeRole, listMembers, removeMember, renameTeam } from "../models/teams.server.ts";
import { hasRole, ROLE_SUMMARY, ROLES } from "../roles.ts";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.team.name ?? "Team"} · Skewsmith` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { user, team, role } = await requireTeamRole(request, params.teamId, "viewer");
  const url = new URL(request.url);
  const sortParam = url.searchParams.get("sort");
  const sort: ProjectSort = (PROJECT_SORTS as readonly string[]).includes(sortParam ?? "") ? (sortParam as ProjectSort) : "name";
  const dir = url.searchParams.get("dir") === "desc" ? "desc" : "asc";
  const [projects, archived, members, profiles, activity] = await Promise.all([
    listProjects(db(), team.id, { sort, dir }),
    listProjects(db(), team.id, { archived: true, sort: "changed", dir: "desc" }),
    listMembers(db(), team.id),
    listTargetProfiles(db(), team.id),
    listActivity(db(), { teamId: team.id }, 15),
  ]);
  const options = { bits: [...LIMITS.bits], roundings: [...ROUNDINGS], halfTurns: [...HALF_TURNS], edges: [...EDGES] };
  return { team, role, me: user.id, sort, dir, projects, archived, members, profiles, activity, options } as const;
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
    case "create-profile": {
      requireAtLeast(role, "editor");
      const parsed = parseForm(targetProfileInput, form);
      if (!parsed.ok) return invalid(intent, parsed.errors);
      return attempt(intent, async () => {
        const profile = await createTargetProfile(db(), { ...parsed.data, teamId: team.id, actorId: user.id });
        return `Created the target profile ${profile.name}.`;
      });
    }
    case "rename-team": {
      requireAtLeast(role, "owner");
      const parsed = parseForm(renameTeamForm, form);
      if (!parsed.ok) return invalid(intent, parsed.errors);
      return attempt(intent, async () => {
        await renameTeam(db(), { teamId: team.id, name: parsed.data.name, expectedVersion: parsed.data.version, actorId: user.id });
      });
    }
    case "change-role": {
      requireAtLeast(role, "owner");
      const parsed = parseForm(changeRoleForm, form);
      if (!parsed.ok) return invalid(intent, parsed.errors, 400, formText(form, "userId"));
      return attempt(intent, () => changeRole(db(), { teamId: team.id, ...parsed.data, actorId: user.id }), parsed.data.userId);
    }
    case "remove-member": {
      requireAtLeast(role, "owner");
      const parsed = parseForm(memberForm, form);
      if (!parsed.ok) return invalid(intent, parsed.errors);
      return attempt(
        intent,
        () => removeMember(db(), { teamId: team.id, userId: parsed.data.userId, actorId: user.id }),
        parsed.data.userId,
      );
    }
    case "leave-team": {
      const result = await attempt(intent, () => removeMember(db(), { teamId: team.id, userId: user.id, actorId: user.id }));
      if (result.data.ok) throw redirect("/");
      return result;
    }
    default:
      return unknownIntent(intent);
  }
}

function MemberRow({
  member,
  me,
  canManage,
}: {
  member: Route.ComponentProps["loaderData"]["members"][number];
  me: string;
  canManage: boolean;
}) {
  const fetcher = useFetcher<ActionResult>({ key: `member-${member.userId}` });
  const error = fetcher.data && !fetcher.data.ok ? Object.values(fetcher.data.errors)[0] : undefined;
  // After a refused change, put the menu back to the role the member really has.
  // (State adjusted during render when the answer changes, as React recommends instead of an effect.)
  const [refusals, setRefusals] = useState(0);
  const [answer, setAnswer] = useState(fetcher.data);
  if (fetcher.data !== answer) {
    setAnswer(fetcher.data);
    if (fetcher.data && !fetcher.data.ok) setRefusals((n) => n + 1);
  }
  const busy = fetcher.state !== "idle";
  return (
    <tr className={TROW} data-testid={`member-${member.login}`}>
      <td className={TCELL}>
        <span className="font-medium text-ink-100">{member.name ?? member.login}</span>
        {member.userId === me ? <span className="ml-2 text-xs text-ink-400">(you)</span> : null}
        <div className="num text-xs text-ink-500">@{member.login}</div>
      </td>
      <td className={`${TCELL} text-ink-300`}>{member.email ?? <span className="text-ink-500">no e-mail shared</span>}</td>
      <td className={TCELL}>
        {canManage ? (
          <fetcher.Form method="post" className="flex items-center gap-2">
            <input type="hidden" name="userId" value={member.userId} />
            <label className="sr-only" htmlFor={`role-${member.userId}`}>
              Role of {member.name ?? member.login}
            </label>
            <Select
              key={`${member.role}-${refusals}`}
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
            <Button size="sm" name="intent" value="change-role" disabled={busy}>
              Change
            </Button>
          </fetcher.Form>
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
      <td className={`${TCELL} text-right`}>
        {canManage && member.userId !== me ? (
          <fetcher.Form method="post">
            <input type="hidden" name="userId" value={member.userId} />
            <Button size="sm" variant="danger" name="intent" value="remove-member" disabled={busy}>
              Remove
            </Button>
          </fetcher.Form>
        ) : null}
      </td>
    </tr>
  );
}

function ProfileForm({
  options,
  actionData,
}: {
  options: Route.ComponentProps["loaderData"]["options"];
  actionData: ActionResult | undefined;
}) {
  const errors = errorsFor(actionData, "create-profile");
  const created = actionData?.ok && actionData.intent === "create-profile" ? actionData.message : undefined;
  const number = (name: string, label: string, value: number, min: number, max: number) => (
    <Field label={label} name={`profile-${name}`} error={errors?.[name]}>
      <TextInput
        id={`profile-${name}`}
        name={name}
        type="number"
        inputMode="numeric"
        min={min}
        max={max}
        defaultValue={value}
        required
        error={errors?.[name]}
        className="num"
      />
    </Field>
  );
  const choice = (name: string, label: string, values: readonly (string | number)[], value: string | number) => (
    <Field label={label} name={`profile-${name}`} error={errors?.[name]}>
      <Select id={`profile-${name}`} name={name} defaultValue={String(value)} error={errors?.[name]}>
        {values.map((v) => (
          <option key={v} value={v}>
            {v}
          </option>
        ))}
      </Select>
    </Field>
  );
  return (
    <details className="mt-5 border-t border-ink-800 pt-4" open={errors !== undefined || undefined}>
      <summary className="cursor-pointer text-sm text-ink-400 hover:text-ink-200">New target profile</summary>
      <Form method="post" className="mt-4 flex flex-col gap-4" aria-label="New target profile">
        <div className="grid gap-3 md:grid-cols-[2fr_3fr]">
          <Field label="Profile name" name="profile-name" error={errors?.name}>
            <TextInput
              id="profile-name"
              name="name"
              maxLength={NAME_MAX}
              required
              placeholder="Say, 16-bit full screen"
              error={errors?.name}
            />
          </Field>
          <Field label="Profile description (optional)" name="profile-description" error={errors?.description}>
            <TextInput
              id="profile-description"
              name="description"
              maxLength={DESCRIPTION_MAX}
              placeholder="Which target and mode it is for"
            />
          </Field>
        </div>
        <div className="grid grid-cols-2 gap-3 md:grid-cols-4 lg:grid-cols-8">
          {number("canvasWidth", "Canvas width", 256, 1, 4096)}
          {number("canvasHeight", "Canvas height", 224, 1, 4096)}
          {choice("fixedPointBits", "Bits", options.bits, 16)}
          {number("fixedPointFraction", "Fraction bits", 8, 0, 31)}
          {choice("rounding", "Rounding", options.roundings, "nearest-away")}
          {choice("halfTurn", "Half-turn", options.halfTurns, "flip")}
          {choice("edges", "Edges", options.edges, "wrap")}
          {number("columnGroup", "Column group", 1, 1, 4096)}
        </div>
        <div className="flex flex-wrap items-end gap-3">
          <div className="w-48">
            <Field label="Label prefix (optional)" name="profile-labelPrefix" error={errors?.labelPrefix}>
              <TextInput
                id="profile-labelPrefix"
                name="labelPrefix"
                maxLength={32}
                placeholder="say, rot_"
                className="num"
                error={errors?.labelPrefix}
              />
            </Field>
          </div>
          <Button variant="primary" name="intent" value="create-profile">
            Create target profile
          </Button>
        </div>
        <FormError>{errors?.form}</FormError>
      </Form>
      {created ? (
        <div className="mt-3">
          <Notice>{created}</Notice>
        </div>
      ) : null}
    </details>
  );
}

export default function TeamPage({ loaderData, actionData }: Route.ComponentProps) {
  const { team, role, me, sort, dir, projects, archived, members, profiles, activity, options } = loaderData;
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

      <Panel title={<Counted label="Members" count={members.length} />} id="members">
        <table className={TABLE} data-testid="members-table">
          <thead className={THEAD}>
            <tr>
              <ColumnHeader label="Member" />
              <ColumnHeader label="E-mail" />
              <ColumnHeader label="Role" />
              <ColumnHeader label="Joined" />
              <ActionsHeader />
            </tr>
          </thead>
          <tbody>
            {members.map((m) => (
              <MemberRow key={m.userId} member={m} me={me} canManage={isOwner} />
            ))}
          </tbody>
        </table>
        <div className="mt-4 flex flex-wrap items-center justify-between gap-3 border-t border-ink-800 pt-4 text-sm text-ink-400">
          <p>
            {isOwner
              ? "Owners change roles and remove members. A team always keeps at least one owner."
              : "Only owners change roles. Ask one if you need more (or less) access."}
          </p>
          <Form method="post">
            <Button size="sm" variant="danger" name="intent" value="leave-team">
              Leave team
            </Button>
          </Form>
        </div>
        <FormError>{leaveErrors?.form}</FormError>
      </Panel>

      <Panel title="Target profiles" id="profiles">
        <p className="mb-3 text-sm text-ink-400">Shared presets of canvas and arithmetic; every project of the team can use them.</p>
        <ProfilesTable
          profiles={profiles}
          emptyHint={
            canEdit ? "Create one below; new effects can then start from its canvas and arithmetic." : "Editors and owners can create them."
          }
        />
        {canEdit ? <ProfileForm options={options} actionData={actionData} /> : null}
      </Panel>

      <Panel title="Recent activity" id="activity">
        <ActivityList items={activity} />
      </Panel>
    </div>
  );
}
