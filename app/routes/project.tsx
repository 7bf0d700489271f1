import { useEffect, useRef } from "react";
import { Form, Link, useFetcher } from "react-router";
import type { Route } from "./+types/project";
import { attempt, invalid, unknownIntent } from "../actions.server.ts";
import { ActivityList } from "../components/ActivityList.tsx";
import { InlineCreateForm } from "../components/InlineCreateForm.tsx";
import { ProfilesTable } from "../components/ProfilesTable.tsx";
import { RestoreList } from "../components/RestoreList.tsx";
import { SpriteLibrary } from "../components/SpriteLibrary.tsx";
import { useFormCheck } from "../components/useFormCheck.ts";
import {
  ActionsHeader,
  Button,
  ColumnHeader,
  Counted,
  Crumbs,
  EmptyState,
  Field,
  FormError,
  Notice,
  PageTitle,
  Panel,
  RoleBadge,
  Select,
  TABLE,
  TCELL,
  TextArea,
  TextInput,
  THEAD,
  TROW,
  Timestamp,
} from "../components/ui.tsx";
import { db } from "../db.server.ts";
import { describeAngles, NEW_EFFECT_CANVAS, qNotation } from "../effects/display.ts";
import {
  createEffectForm,
  DESCRIPTION_MAX,
  effectForm,
  errorsFor,
  NAME_MAX,
  parseForm,
  projectDetailsForm,
  renameEffectForm,
  type ActionResult,
} from "../forms.ts";
import { requireProjectRole } from "../guards.server.ts";
import { formText, readForm } from "../http.server.ts";
import {
  createEffect,
  deleteEffect,
  duplicateEffect,
  getEffect,
  listEffectsAndDeleted,
  renameEffect,
  restoreEffect,
} from "../models/effects.server.ts";
import { archiveProject, restoreProject, updateProject } from "../models/projects.server.ts";
import { getProjectPageLists } from "../models/projectPage.server.ts";
import { hasRole } from "../roles.ts";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.project.name ?? "Project"} · Skewsmith` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { team, project, role } = await requireProjectRole(request, params.projectId, "viewer");
  const [{ live: effects, deleted }, { profiles, sprites, activity, activityTotal }] = await Promise.all([
    listEffectsAndDeleted(db(), project.id),
    getProjectPageLists(db(), { teamId: team.id, projectId: project.id }, 12),
  ]);
  return {
    team: { id: team.id, name: team.name },
    project,
    role,
    effects: effects.map(({ document, ...e }) => ({
      ...e,
      canvas: `${document.canvas.width} × ${document.canvas.height}`,
      angles: describeAngles(document.angles),
      fixedPoint: qNotation(document.fixedPoint),
    })),
    deleted: deleted.map((e) => ({ id: e.id, name: e.name, deletedAt: e.deletedAt! })),
    profiles,
    sprites,
    activity,
    activityTotal,
  };
}

/** Every change on this page needs an editor (or owner); a viewer gets a 403 before anything is read. */
export async function action({ request, params }: Route.ActionArgs) {
  const { user, project } = await requireProjectRole(request, params.projectId, "editor");
  const form = await readForm(request);
  const intent = formText(form, "intent");
  const actorId = user.id;

  // Effect-level changes must name an effect of this project.
  const effectOfProject = async () => {
    const parsed = parseForm(effectForm, form);
    const effect = parsed.ok ? await getEffect(db(), parsed.data.effectId) : null;
    return effect && effect.projectId === project.id ? effect : null;
  };

  switch (intent) {
    case "update-project": {
      const parsed = parseForm(projectDetailsForm, form);
      if (!parsed.ok) return invalid(intent, parsed.errors);
      return attempt(intent, async () => {
        const { name, description, version } = parsed.data;
        await updateProject(db(), { projectId: project.id, name, description, expectedVersion: version, actorId });
        return "Project details saved.";
      });
    }
    case "archive-project":
      return attempt(intent, async () => {
        await archiveProject(db(), { projectId: project.id, actorId });
        return "Project archived.";
      });
    case "restore-project":
      return attempt(intent, async () => {
        await restoreProject(db(), { projectId: project.id, actorId });
        return "Project restored.";
      });
    case "create-effect": {
      const parsed = parseForm(createEffectForm, form);
      if (!parsed.ok) return invalid(intent, parsed.errors);
      return attempt(intent, async () => {
        const effect = await createEffect(db(), {
          projectId: project.id,
          name: parsed.data.name,
          targetProfileId: parsed.data.targetProfileId,
          actorId,
        });
        return `Created ${effect.name}.`;
      });
    }
    case "rename-effect": {
      const parsed = parseForm(renameEffectForm, form);
      if (!parsed.ok) return invalid(intent, parsed.errors, 400, formText(form, "effectId"));
      if (!(await effectOfProject())) return invalid(intent, { form: "That effect is not in this project." }, 404, parsed.data.effectId);
      const { effectId, name, version } = parsed.data;
      return attempt(intent, async () => void (await renameEffect(db(), { effectId, name, expectedVersion: version, actorId })), effectId);
    }
    case "duplicate-effect":
    case "delete-effect":
    case "restore-effect": {
      const effect = await effectOfProject();
      if (!effect) return invalid(intent, { form: "That effect is not in this project." }, 404, formText(form, "effectId"));
      const change = { "duplicate-effect": duplicateEffect, "delete-effect": deleteEffect, "restore-effect": restoreEffect }[intent];
      return attempt(intent, async () => void (await change(db(), { effectId: effect.id, actorId })), effect.id);
    }
    default:
      return unknownIntent(intent);
  }
}

type LoaderData = Route.ComponentProps["loaderData"];

function EffectRow({ effect, canEdit }: { effect: LoaderData["effects"][number]; canEdit: boolean }) {
  const fetcher = useFetcher<ActionResult>({ key: `effect-${effect.id}` });
  const renameCheck = useFormCheck(renameEffectForm);
  const serverErrors = fetcher.data && !fetcher.data.ok ? fetcher.data.errors : undefined;
  const errors = renameCheck.errors ?? serverErrors;
  const renaming = renameCheck.errors !== undefined || (serverErrors !== undefined && fetcher.data?.intent === "rename-effect");
  const busy = fetcher.state !== "idle";
  // Close the rename box once a rename has gone through; it stays open to show what was wrong otherwise.
  const renameBox = useRef<HTMLDetailsElement>(null);
  const renamed = fetcher.state === "idle" && fetcher.data?.ok === true && fetcher.data.intent === "rename-effect";
  useEffect(() => {
    if (renamed && renameBox.current) renameBox.current.open = false;
  }, [renamed, fetcher.data]);
  const change = (intent: string, label: string, variant: "quiet" | "danger") => (
    <fetcher.Form method="post">
      <input type="hidden" name="effectId" value={effect.id} />
      <Button size="sm" variant={variant} name="intent" value={intent} disabled={busy}>
        {label}
      </Button>
    </fetcher.Form>
  );
  return (
    <tr className={TROW} data-testid={`effect-row-${effect.name}`}>
      <td className={`${TCELL} min-w-48`}>
        <Link to={`/effects/${effect.id}`} className="font-medium text-ink-100 hover:text-glass-300">
          {effect.name}
        </Link>
        <div className="text-xs text-ink-400">{effect.angles}</div>
        {effect.description ? (
          <p className="mt-0.5 line-clamp-2 max-w-sm text-xs text-ink-500" title={effect.description}>
            {effect.description}
          </p>
        ) : null}
      </td>
      <td className={TCELL}>
        <div className="num whitespace-nowrap">{effect.canvas}</div>
        <div className="num text-xs text-ink-400">{effect.fixedPoint}</div>
      </td>
      <td className={`${TCELL} min-w-40 text-ink-300`}>
        <div>{effect.targetProfileName ?? <span className="text-ink-500">own settings</span>}</div>
        <div className="text-xs">{effect.spriteName ?? <span className="text-ink-500">no sprite</span>}</div>
      </td>
      <td className={TCELL}>
        <div className="whitespace-nowrap">
          <span className="num text-ink-200">v{effect.version}</span> <Timestamp value={effect.updatedAt} />
        </div>
        {effect.updatedByName ? <div className="text-xs text-ink-500">by {effect.updatedByName}</div> : null}
      </td>
      {canEdit ? (
        <td className={`${TCELL} text-right`}>
          <div className="flex items-center justify-end gap-1">
            <details ref={renameBox} open={renaming || undefined} className="relative">
              <summary className="cursor-pointer list-none rounded-md px-2 py-1 text-xs text-ink-300 hover:bg-ink-800 hover:text-ink-100">
                Rename
              </summary>
              <fetcher.Form
                method="post"
                onSubmit={renameCheck.onSubmit}
                noValidate
                className="absolute right-0 top-full z-20 mt-1 flex w-64 flex-col gap-2 rounded-md border border-ink-600 bg-ink-850 p-3 text-left shadow-lg shadow-black/40"
              >
                <input type="hidden" name="effectId" value={effect.id} />
                <input type="hidden" name="version" value={effect.version} />
                <Field label="New name" name={`rename-${effect.id}`} error={errors?.name ?? errors?.version}>
                  <TextInput
                    id={`rename-${effect.id}`}
                    name="name"
                    defaultValue={effect.name}
                    maxLength={NAME_MAX}
                    required
                    error={errors?.name}
                  />
                </Field>
                <Button size="sm" variant="primary" name="intent" value="rename-effect" disabled={busy}>
                  Save name
                </Button>
              </fetcher.Form>
            </details>
            {change("duplicate-effect", "Duplicate", "quiet")}
            {change("delete-effect", "Delete", "danger")}
          </div>
          {errors && !renaming ? <p className="mt-1 text-xs text-alert-300">{Object.values(errors)[0]}</p> : null}
        </td>
      ) : null}
    </tr>
  );
}

export default function ProjectPage({ loaderData, actionData }: Route.ComponentProps) {
  const { team, project, role, effects, deleted, profiles, sprites, activity, activityTotal } = loaderData;
  const canEdit = hasRole(role, "editor");
  const archived = project.archivedAt !== null;
  const detailsCheck = useFormCheck(projectDetailsForm);
  const createCheck = useFormCheck(createEffectForm);
  const detailsErrors = detailsCheck.errors ?? errorsFor(actionData, "update-project");
  const createErrors = createCheck.errors ?? errorsFor(actionData, "create-effect");
  const notice = actionData?.ok ? actionData.message : undefined;
  const restoreErrors = errorsFor(actionData, "restore-project") ?? errorsFor(actionData, "restore-effect");
  return (
    <div className="flex flex-col gap-8">
      <div>
        <Crumbs items={[{ label: "Home", to: "/" }, { label: team.name, to: `/teams/${team.id}` }, { label: project.name }]} />
        <PageTitle
          title={project.name}
          meta={
            <>
              <span>{team.name} · your role</span>
              <RoleBadge role={role} />
            </>
          }
          actions={
            canEdit ? (
              <Form method="post">
                <Button variant={archived ? "primary" : "secondary"} name="intent" value={archived ? "restore-project" : "archive-project"}>
                  {archived ? "Restore project" : "Archive project"}
                </Button>
              </Form>
            ) : null
          }
        />
        {project.description ? <p className="max-w-3xl whitespace-pre-line text-ink-300">{project.description}</p> : null}
        <div className="mt-4 flex flex-col gap-3">
          {archived ? (
            <Notice>
              This project is archived: it is hidden from the team's list and its effects cannot change.{" "}
              {canEdit ? "Restore it to work on it again." : "An editor or owner can restore it."}
            </Notice>
          ) : null}
          {notice ? <Notice>{notice}</Notice> : null}
          <FormError>{restoreErrors?.form ?? errorsFor(actionData, "archive-project")?.form}</FormError>
        </div>
        {canEdit && !archived ? (
          <details className="mt-4 max-w-3xl" open={detailsErrors !== undefined}>
            <summary className="cursor-pointer text-sm text-ink-400 hover:text-ink-200">Edit name and description</summary>
            <Form
              method="post"
              className="mt-3 flex flex-col gap-3"
              aria-label="Project details"
              onSubmit={detailsCheck.onSubmit}
              noValidate
            >
              <input type="hidden" name="version" value={project.version} />
              <Field label="Name" name="project-name" error={detailsErrors?.name}>
                <TextInput
                  id="project-name"
                  name="name"
                  defaultValue={project.name}
                  maxLength={NAME_MAX}
                  required
                  error={detailsErrors?.name}
                />
              </Field>
              <Field label="Description" name="project-description" error={detailsErrors?.description}>
                <TextArea
                  id="project-description"
                  name="description"
                  defaultValue={project.description}
                  maxLength={DESCRIPTION_MAX}
                  error={detailsErrors?.description}
                />
              </Field>
              <FormError>{detailsErrors?.form ?? detailsErrors?.version}</FormError>
              <div>
                <Button variant="primary" name="intent" value="update-project">
                  Save details
                </Button>
              </div>
            </Form>
          </details>
        ) : null}
      </div>

      <Panel title={<Counted label="Effects" count={effects.length} />} id="effects">
        {effects.length === 0 ? (
          <EmptyState title="No effects in this project yet">
            {canEdit && !archived
              ? "Create one below: it starts as a full-turn sweep of 64 frames on the chosen target profile's canvas, ready to tune in the bench."
              : "When an editor creates an effect, it shows up here."}
          </EmptyState>
        ) : (
          // Scrolls sideways only on narrow screens; from 1024 px wide it fits, and the rename box may overhang it.
          <div className="overflow-x-auto lg:overflow-visible">
            <table className={TABLE} data-testid="effects-table">
              <thead className={THEAD}>
                <tr>
                  <ColumnHeader label="Effect" />
                  <ColumnHeader label="Canvas, fixed point" />
                  <ColumnHeader label="Target profile, sprite" />
                  <ColumnHeader label="Version, last change" />
                  {canEdit && !archived ? <ActionsHeader /> : null}
                </tr>
              </thead>
              <tbody>
                {effects.map((e) => (
                  <EffectRow key={e.id} effect={e} canEdit={canEdit && !archived} />
                ))}
              </tbody>
            </table>
          </div>
        )}

        {canEdit && !archived ? (
          <InlineCreateForm
            label="New effect"
            columns="md:grid-cols-[2fr_2fr_auto]"
            intent="create-effect"
            submit="Create effect"
            onSubmit={createCheck.onSubmit}
            formError={createErrors?.form}
          >
            <Field label="New effect name" name="name" error={createErrors?.name}>
              <TextInput name="name" maxLength={NAME_MAX} required placeholder="Say, Lighthouse beam" error={createErrors?.name} />
            </Field>
            <Field label="Target profile" name="targetProfileId" error={createErrors?.targetProfileId}>
              <Select name="targetProfileId" defaultValue="" error={createErrors?.targetProfileId}>
                <option value="">
                  Own settings ({NEW_EFFECT_CANVAS} × {NEW_EFFECT_CANVAS}, Q8.8)
                </option>
                {profiles.map((p) => (
                  <option key={p.id} value={p.id}>
                    {p.name} ({p.canvasWidth} × {p.canvasHeight}, {qNotation({ bits: p.fixedPointBits, fraction: p.fixedPointFraction })})
                  </option>
                ))}
              </Select>
            </Field>
          </InlineCreateForm>
        ) : null}

        <RestoreList
          title="Recently deleted"
          verb="deleted"
          items={deleted.map((e) => ({ id: e.id, name: e.name, at: e.deletedAt }))}
          idField="effectId"
          intent="restore-effect"
          canRestore={canEdit && !archived}
        />
      </Panel>

      <Panel title="Target profiles" id="profiles">
        <p className="mb-3 text-sm text-ink-400">
          Shared by every project of {team.name}; the count is of this project's effects that use each one.
        </p>
        <ProfilesTable
          profiles={profiles}
          teamId={team.id}
          emptyHint="The team has no target profiles yet; effects keep their own settings."
          countLabel="Used here"
        />
      </Panel>
      <SpriteLibrary projectId={project.id} sprites={sprites} canEdit={canEdit && !archived} />
      <Panel
        title="Recent activity"
        id="activity"
        actions={
          <Link to={`/projects/${project.id}/activity`} className="text-sm text-glass-300 hover:underline">
            All activity (<span className="num">{activityTotal}</span>)
          </Link>
        }
      >
        <ActivityList items={activity} />
      </Panel>
    </div>
  );
}
