import { data } from "react-router";
import type { Route } from "./+types/project.sprites";
import { invalid, unknownIntent } from "../actions.server.ts";
import { SpriteLibrary } from "../components/SpriteLibrary.tsx";
import { Crumbs, FormError, Notice, PageTitle, RoleBadge } from "../components/ui.tsx";
import { db } from "../db.server.ts";
import { NAME_MAX, nameText, parseForm, type ActionResult, type FieldErrors } from "../forms.ts";
import { requireProjectRole } from "../guards.server.ts";
import { formText, readForm } from "../http.server.ts";
import { DomainError } from "../models/errors.ts";
import { createSprite, deleteSprite, listSprites, renameSprite, replaceSprite, SPRITE_MAX_BYTES } from "../models/sprites.server.ts";
import { hasRole } from "../roles.ts";
import {
  deleteSpriteForm,
  nameFromFile,
  renameSpriteForm,
  replaceSpriteForm,
  SPRITE_FORM_MAX_BYTES,
  uploadSpriteForm,
} from "../sprites/forms.ts";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Sprites of ${data?.project.name ?? "a project"} · Skewsmith` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { team, project, role } = await requireProjectRole(request, params.projectId, "viewer");
  return {
    team: { id: team.id, name: team.name },
    project: { id: project.id, name: project.name, archived: project.archivedAt !== null },
    role,
    sprites: await listSprites(db(), project.id),
  };
}

/** What readForm threw (a 413, 415 or 400 answer), if that is what `error` is. */
function thrownAnswer(error: unknown): { message: string; status: number } | null {
  if (typeof error !== "object" || error === null || !("init" in error) || !("data" in error)) return null;
  const { data: body, init } = error as { data: { message?: string }; init: ResponseInit | null };
  return { message: body?.message ?? "The form could not be read.", status: init?.status ?? 400 };
}

/** Runs a change; a broken product rule comes back as a field message, success with a message and the sprite concerned. */
async function change(intent: string, subject: string | undefined, work: () => Promise<{ message: string; subject?: string }>) {
  try {
    const done = await work();
    return data<ActionResult>({ ok: true, intent, message: done.message, subject: done.subject ?? subject });
  } catch (error) {
    if (error instanceof DomainError) return invalid(intent, { [error.field ?? "form"]: error.message }, error.status, subject);
    throw error;
  }
}

/** The uploaded file of the form, as bytes; a field message when there is none, or more than one. */
async function fileOf(form: FormData): Promise<{ ok: true; file: File; bytes: Uint8Array } | { ok: false; errors: FieldErrors }> {
  const all = form.getAll("file");
  if (all.length > 1) return { ok: false, errors: { file: `The form sent ${all.length} files; a sprite is one PNG file.` } };
  const file = all[0];
  if (!(file instanceof File) || (file.size === 0 && file.name === "")) return { ok: false, errors: { file: "Choose a PNG file first." } };
  if (file.size === 0) return { ok: false, errors: { file: "The file is empty." } };
  return { ok: true, file, bytes: new Uint8Array(await file.arrayBuffer()) };
}

/** Every change to the library needs an editor (or owner); a viewer gets a 403 before the body is read. */
export async function action({ request, params }: Route.ActionArgs) {
  const { user, project } = await requireProjectRole(request, params.projectId, "editor");
  let form: FormData;
  try {
    form = await readForm(request, { maxBytes: SPRITE_FORM_MAX_BYTES });
  } catch (error) {
    const answer = thrownAnswer(error);
    if (!answer) throw error;
    const message =
      answer.status === 413 ? `The file is larger than ${SPRITE_MAX_BYTES} bytes (4 MiB), the most a sprite can be.` : answer.message;
    return invalid("upload-sprite", { file: message }, answer.status);
  }
  const intent = formText(form, "intent");
  const actorId = user.id;

  switch (intent) {
    case "upload-sprite": {
      const parsed = parseForm(uploadSpriteForm, form);
      const upload = await fileOf(form);
      if (!parsed.ok || !upload.ok) return invalid(intent, { ...(parsed.ok ? {} : parsed.errors), ...(upload.ok ? {} : upload.errors) });
      const name = nameText("sprite").safeParse(parsed.data.name || nameFromFile(upload.file.name, NAME_MAX));
      if (!name.success) return invalid(intent, { name: name.error.issues[0].message });
      return change(intent, undefined, async () => {
        const sprite = await createSprite(db(), { projectId: project.id, name: name.data, png: upload.bytes, actorId });
        return {
          message: `Added ${sprite.name} (${sprite.width} × ${sprite.height}, ${sprite.kind === "indexed" ? `${sprite.palette.length} colours` : "RGBA"}).`,
          subject: sprite.id,
        };
      });
    }
    case "rename-sprite": {
      const parsed = parseForm(renameSpriteForm, form);
      const subject = formText(form, "spriteId");
      if (!parsed.ok) return invalid(intent, parsed.errors, 400, subject);
      return change(intent, subject, async () => {
        const sprite = await renameSprite(db(), { projectId: project.id, ...parsed.data, expectedVersion: parsed.data.version, actorId });
        return { message: `Renamed the sprite to ${sprite.name}.` };
      });
    }
    case "replace-sprite": {
      const parsed = parseForm(replaceSpriteForm, form);
      const subject = formText(form, "spriteId");
      if (!parsed.ok) return invalid(intent, parsed.errors, 400, subject);
      const upload = await fileOf(form);
      if (!upload.ok) return invalid(intent, upload.errors, 400, subject);
      return change(intent, subject, async () => {
        const { sprite, notes } = await replaceSprite(db(), {
          projectId: project.id,
          spriteId: parsed.data.spriteId,
          png: upload.bytes,
          expectedVersion: parsed.data.version,
          actorId,
        });
        return {
          message: [
            `Replaced the picture of ${sprite.name} (now ${sprite.width} × ${sprite.height}, ${sprite.kind === "indexed" ? `${sprite.palette.length} colours` : "RGBA"}).`,
            ...notes,
          ].join(" "),
        };
      });
    }
    case "delete-sprite": {
      const parsed = parseForm(deleteSpriteForm, form);
      const subject = formText(form, "spriteId");
      if (!parsed.ok) return invalid(intent, parsed.errors, 400, subject);
      return change(intent, subject, async () => {
        const { name, detached } = await deleteSprite(db(), {
          projectId: project.id,
          spriteId: parsed.data.spriteId,
          expectedVersion: parsed.data.version,
          expectedUsers: parsed.data.users,
          actorId,
        });
        return {
          message: `Deleted ${name}.${detached.length ? ` Detached it from ${detached.join(", ")}; ${detached.length === 1 ? "that effect keeps its" : "those effects keep their"} settings.` : ""}`,
        };
      });
    }
    default:
      return unknownIntent(intent);
  }
}

/** The library on a page of its own: where forms land when JavaScript is off, and a link to share. */
export default function ProjectSpritesPage({ loaderData, actionData }: Route.ComponentProps) {
  const { team, project, role, sprites } = loaderData;
  const errors = actionData && !actionData.ok ? Object.values(actionData.errors) : [];
  return (
    <div className="flex flex-col gap-6">
      <div>
        <Crumbs
          items={[
            { label: "Home", to: "/" },
            { label: team.name, to: `/teams/${team.id}` },
            { label: project.name, to: `/projects/${project.id}` },
            { label: "Sprites" },
          ]}
        />
        <PageTitle
          title={`Sprites of ${project.name}`}
          meta={
            <>
              <span>{team.name} · your role</span>
              <RoleBadge role={role} />
            </>
          }
        />
        {actionData?.ok && actionData.message ? <Notice>{actionData.message}</Notice> : null}
        <FormError>{errors.length ? errors.join(" ") : undefined}</FormError>
      </div>
      <SpriteLibrary projectId={project.id} sprites={sprites} canEdit={hasRole(role, "editor") && !project.archived} standalone />
    </div>
  );
}
