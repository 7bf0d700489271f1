import { data, isRouteErrorResponse, Link } from "react-router";
import type { Route } from "./+types/effect";
import { invalid, unknownIntent } from "../actions.server.ts";
import { stateToDraft, type BenchDraft } from "../bench/draft.ts";
import { exportChoiceFrom } from "../bench/exportChoice.ts";
import { exportDefaultsForProfile } from "../exports/defaults.ts";
import { BENCH_FIELDS, benchErrors, benchForm, saveForm } from "../bench/form.ts";
import { benchState, savedDiagnostics } from "../bench/saved.server.ts";
import { packDiagnostics } from "../bench/savedWire.ts";
import { viewFromSearch } from "../bench/view.ts";
import { Bench } from "../components/bench/Bench.tsx";
import { buttonClass } from "../components/ui.tsx";
import { db } from "../db.server.ts";
import { formShapeErrors, parseForm } from "../forms.ts";
import { requireEffectRole } from "../guards.server.ts";
import { formText, readForm } from "../http.server.ts";
import { saveEffectBench } from "../models/effects.server.ts";
import { DomainError } from "../models/errors.ts";
import { getEffectPageLists } from "../models/effectPage.server.ts";
import { displayName, getUser } from "../models/users.server.ts";
import { hasRole } from "../roles.ts";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.effect.name ?? "Effect"} · bench · Skewsmith` }];

/** The bench is wide: it asks the root layout for the whole window. */
export const handle = { wide: true };

export async function loader({ request, params }: Route.LoaderArgs) {
  const { team, project, effect, role } = await requireEffectRole(request, params.effectId, "viewer");
  const saved = benchState(effect);
  const { profiles, sprites, updatedBy, profileChange } = await getEffectPageLists(db(), {
    teamId: team.id,
    projectId: project.id,
    effectId: effect.id,
  });
  // The sprite's version comes with the project's list, read before its picture is (as savedDiagnostics requires).
  const diagnostics = await savedDiagnostics(db(), effect, {
    spriteVersion: sprites.find((s) => s.id === effect.spriteId)?.version,
    state: saved,
  });
  const frames =
    diagnostics.rows?.length ?? ("list" in saved.document.angles ? saved.document.angles.list.length : saved.document.angles.sweep.frames);
  const profile = profiles.find((p) => p.id === effect.targetProfileId) ?? null;
  const editable = hasRole(role, "editor") && effect.deletedAt === null && project.archivedAt === null;
  return {
    team: { id: team.id, name: team.name },
    project: { id: project.id, name: project.name, archived: project.archivedAt !== null },
    effect: { id: effect.id, name: effect.name, version: effect.version, updatedAt: effect.updatedAt, deletedAt: effect.deletedAt },
    updatedBy: updatedBy ? displayName(updatedBy) : null,
    role,
    editable,
    saved,
    profiles,
    sprites,
    diagnostics: packDiagnostics(diagnostics),
    /** The last change of its target profile that reached the effect (who, when, each setting before and after). */
    profileChange,
    exportDefaults: exportChoiceFrom(exportDefaultsForProfile(profile, effect.name), effect.name),
    view: viewFromSearch(new URL(request.url).searchParams, frames, saved.document.canvas),
  };
}

/** What the save answers: the new version, field messages, or (409) the save someone made first. */
export type SaveResult =
  | { ok: true; intent: "save"; version: number; message: string; changed: string[] }
  | {
      ok: false;
      intent: string;
      errors: Record<string, string>;
      conflict?: { version: number; draft: BenchDraft; updatedBy: string | null; updatedAt: string };
    };

/** Editors and owners save the bench; a viewer gets a 403 before the body is read. */
export async function action({ request, params }: Route.ActionArgs) {
  const { user, effect } = await requireEffectRole(request, params.effectId, "editor");
  const form = await readForm(request);
  const intent = formText(form, "intent");
  if (intent !== "save") return unknownIntent(intent);
  const shape = formShapeErrors(form, BENCH_FIELDS);
  const version = parseForm(saveForm, form);
  if (!version.ok || Object.keys(shape).length > 0) return invalid(intent, { ...(version.ok ? {} : version.errors), ...shape });
  const fields: Record<string, string> = {};
  for (const [key, value] of form.entries()) if (typeof value === "string") fields[key] = value;
  const parsed = benchForm.safeParse(fields);
  if (!parsed.success) return invalid(intent, benchErrors(parsed.error));
  try {
    const result = await saveEffectBench(db(), {
      effectId: effect.id,
      expectedVersion: version.data.version,
      actorId: user.id,
      ...parsed.data,
    });
    if (!result.ok) {
      const by = result.current.updatedBy ? await getUser(db(), result.current.updatedBy) : null;
      const who = by ? displayName(by) : "Someone";
      return data<SaveResult>(
        {
          ok: false,
          intent,
          errors: {
            form: `${who} saved this effect (version ${result.current.version}) after you opened version ${version.data.version}. Nothing was overwritten: your edits are still here. See what changed below, then keep your edits on top of theirs or load theirs.`,
          },
          conflict: {
            version: result.current.version,
            draft: stateToDraft(benchState(result.current)),
            updatedBy: by ? displayName(by) : null,
            updatedAt: result.current.updatedAt.toISOString(),
          },
        },
        { status: 409 },
      );
    }
    return data<SaveResult>({
      ok: true,
      intent,
      version: result.effect.version,
      changed: result.changed,
      message: result.changed.length === 0 ? "Nothing changed; the version stays." : `Saved version ${result.effect.version}.`,
    });
  } catch (error) {
    if (error instanceof DomainError) return invalid(intent, { [error.field ?? "form"]: error.message }, error.status);
    throw error;
  }
}

export default function EffectBench({ loaderData }: Route.ComponentProps) {
  return <Bench data={loaderData} />;
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  const status = isRouteErrorResponse(error) ? error.status : 500;
  const detail = isRouteErrorResponse(error) ? (error.data as { message?: string } | undefined)?.message : undefined;
  return (
    <div className="mx-auto max-w-2xl py-16">
      <p className="num text-sm text-glass-400">{status}</p>
      <h1 className="mt-1 text-2xl font-semibold">
        {status === 404 ? "No such effect" : status === 403 ? "Your role does not allow this" : "The bench could not open"}
      </h1>
      <p className="mt-3 text-ink-200" data-testid="error-message">
        {detail ??
          (status === 404
            ? "This effect does not exist, or you are not a member of its team."
            : "Something went wrong while opening the bench. Reload the page to try again.")}
      </p>
      <p className="mt-6">
        <Link to="/" className={buttonClass("secondary")}>
          Back to your teams
        </Link>
      </p>
    </div>
  );
}
