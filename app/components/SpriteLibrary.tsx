import { useEffect, useRef, useState } from "react";
import { Link, useFetcher } from "react-router";
import useSWR from "swr";
import type { ActionResult } from "../forms.ts";
import { NAME_MAX } from "../forms.ts";
import type { SpriteListItem } from "../models/sprites.server.ts";
import { spriteImageUrl, SpriteImage } from "./Sprite.tsx";
import { byteWords, DropZone, SpriteUpload } from "./SpriteUpload.tsx";
import { Button, buttonClass, Counted, EmptyState, Field, FormError, Notice, Panel, Select, TextInput, Timestamp } from "./ui.tsx";

/** A sprite as the library shows it: the list item of the model, with dates as the loader or the JSON route sent them. */
export type LibrarySprite = Omit<SpriteListItem, "createdAt" | "updatedAt"> & { createdAt: Date | string; updatedAt: Date | string };

const fetchList = async (url: string): Promise<LibrarySprite[]> => {
  const response = await fetch(url, { headers: { Accept: "application/json" } });
  if (!response.ok) throw new Error(`${url}: ${response.status}`);
  return response.json();
};

/** The zooms offered, in whole screen pixels per sprite pixel. */
const ZOOMS = [1, 2, 3, 4, 6, 8, 12, 16];

/** Largest offered zoom at which the sprite fits a box of `box` pixels (at least 1: big sprites scroll instead). */
export const fitZoom = (sprite: { width: number; height: number }, box = 320) => {
  const most = Math.floor(Math.min(box / sprite.width, box / sprite.height));
  return ZOOMS.filter((z) => z <= most).pop() ?? 1;
};

const kindWords = (s: LibrarySprite) => (s.kind === "indexed" ? `indexed, ${s.colours} colour${s.colours === 1 ? "" : "s"}` : "RGBA");
const hex = (c: readonly number[]) =>
  `#${c
    .slice(0, 3)
    .map((v) => v.toString(16).padStart(2, "0"))
    .join("")}`;

/**
 * The project's sprite library: the list, a preview of the chosen sprite at whole-pixel zoom, its palette and the
 * effects that use it; for editors the upload (file input or drag-and-drop), rename, replace and delete. The list
 * comes from the page's loader and refreshes itself from `/projects/:id/sprites.json` when the window regains focus.
 */
export function SpriteLibrary({
  projectId,
  sprites,
  canEdit,
  standalone = false,
}: {
  projectId: string;
  sprites: LibrarySprite[];
  canEdit: boolean;
  /** On the library's own page: link back to the project instead of to itself. */
  standalone?: boolean;
}) {
  const key = `/projects/${projectId}/sprites.json`;
  const { data, mutate } = useSWR(key, fetchList, { fallbackData: sprites, revalidateOnMount: false, revalidateOnFocus: true });
  // After an action the page's loader runs again; its list is the newest, so it replaces whatever SWR holds.
  useEffect(() => {
    void mutate(sprites, { revalidate: false });
  }, [sprites, mutate]);
  const list = data ?? sprites;
  const [chosenId, setChosenId] = useState<string | null>(null);
  const [message, setMessage] = useState<string | null>(null);
  const chosen = list.find((s) => s.id === chosenId) ?? list[0] ?? null;
  const action = `/projects/${projectId}/sprites`;
  // Uploads and deletions report here: the new sprite is chosen, and a deleted one's own form is gone by then.
  useNewAnswer(useFetcher<ActionResult>({ key: UPLOAD_KEY }), (answer) => {
    setMessage(answer.message ?? "Sprite added.");
    if (answer.subject) setChosenId(answer.subject);
  });
  useNewAnswer(useFetcher<ActionResult>({ key: DELETE_KEY }), (answer) => setMessage(answer.message ?? "Sprite deleted."));

  return (
    <Panel
      title={<Counted label="Sprites" count={list.length} />}
      id="sprites"
      actions={
        <Link to={standalone ? `/projects/${projectId}` : action} className="text-xs text-ink-400 hover:text-glass-300">
          {standalone ? "Back to the project" : "Open the library on its own page"}
        </Link>
      }
    >
      <div className="flex flex-col gap-5">
        <div aria-live="polite">{message ? <Notice>{message}</Notice> : null}</div>
        {canEdit ? <SpriteUpload action={action} fetcherKey={UPLOAD_KEY} /> : null}
        {list.length === 0 ? (
          <EmptyState title="No sprites in this project yet">
            {canEdit
              ? "Upload a PNG above: an indexed (palette) picture keeps its palette indices, as retro targets store them; an RGBA one is turned as true colour."
              : "When an editor uploads a sprite, it shows up here."}
          </EmptyState>
        ) : (
          <div className="grid gap-5 md:grid-cols-[minmax(0,2fr)_minmax(0,3fr)]">
            <ul className="flex max-h-[32rem] flex-col gap-1 overflow-y-auto pr-1" aria-label="Sprites of this project">
              {list.map((s) => (
                <li key={s.id}>
                  <button
                    type="button"
                    onClick={() => setChosenId(s.id)}
                    aria-pressed={chosen?.id === s.id}
                    data-testid={`sprite-item-${s.name}`}
                    className={`flex w-full items-center gap-3 rounded-md px-2 py-2 text-left hover:bg-ink-800 ${
                      chosen?.id === s.id ? "bg-ink-800 ring-1 ring-glass-700" : ""
                    }`}
                  >
                    <SpriteImage sprite={s} alt="" width={40} height={40} className="h-10 w-10 shrink-0 object-contain" />
                    <span className="min-w-0 text-sm">
                      <span className="block truncate text-ink-100">{s.name}</span>
                      <span className="num block text-xs text-ink-400">
                        {s.width} × {s.height} · {s.kind === "indexed" ? `${s.colours} col.` : "RGBA"} ·{" "}
                        {s.usedBy.length === 0 ? "unused" : `${s.usedBy.length} effect${s.usedBy.length === 1 ? "" : "s"}`}
                      </span>
                    </span>
                  </button>
                </li>
              ))}
            </ul>
            {chosen ? <SpriteDetail key={chosen.id} sprite={chosen} action={action} canEdit={canEdit} /> : null}
          </div>
        )}
      </div>
    </Panel>
  );
}

function SpriteDetail({ sprite, action, canEdit }: { sprite: LibrarySprite; action: string; canEdit: boolean }) {
  const [zoom, setZoom] = useState(() => fitZoom(sprite));
  const [message, setMessage] = useState<string | null>(null);
  const rename = useFetcher<ActionResult>({ key: `rename-sprite-${sprite.id}` });
  const replace = useFetcher<ActionResult>({ key: `replace-sprite-${sprite.id}` });
  useNewAnswer(rename, (answer) => setMessage(answer.message ?? "Renamed."));
  useNewAnswer(replace, (answer) => setMessage(answer.message ?? "Replaced."));
  const live = sprite.usedBy.filter((u) => !u.deleted);
  const deleted = sprite.usedBy.filter((u) => u.deleted);
  return (
    <div className="flex min-w-0 flex-col gap-4" data-testid="sprite-detail">
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <h3 className="min-w-0 truncate text-base font-semibold text-ink-100" data-testid="sprite-detail-name">
          {sprite.name}
        </h3>
        <div className="flex items-center gap-2">
          <label htmlFor={`zoom-${sprite.id}`} className="text-xs text-ink-400">
            Zoom
          </label>
          <Select id={`zoom-${sprite.id}`} value={zoom} onChange={(e) => setZoom(Number(e.target.value))} className="w-20 py-1">
            {ZOOMS.map((z) => (
              <option key={z} value={z}>
                {z}×
              </option>
            ))}
          </Select>
        </div>
      </div>
      <div className="max-h-[22rem] overflow-auto rounded-md border border-ink-800 bg-ink-950 p-3">
        <SpriteImage
          sprite={sprite}
          alt={`Preview of ${sprite.name} at ${zoom}×`}
          data-testid="sprite-preview"
          width={sprite.width * zoom}
          height={sprite.height * zoom}
          style={{ width: sprite.width * zoom, height: sprite.height * zoom, maxWidth: "none" }}
        />
      </div>
      <dl className="grid grid-cols-[auto_minmax(0,1fr)] gap-x-4 gap-y-1.5 text-sm">
        <dt className="text-ink-400">Size</dt>
        <dd className="num">
          {sprite.width} × {sprite.height} px
        </dd>
        <dt className="text-ink-400">Pixels</dt>
        <dd>{kindWords(sprite)}</dd>
        <dt className="text-ink-400">File</dt>
        <dd className="num">
          {byteWords(sprite.byteSize)} · v{sprite.version}
        </dd>
        <dt className="text-ink-400">Changed</dt>
        <dd>
          <Timestamp value={sprite.updatedAt} />
          {sprite.uploadedByName ? <span className="text-ink-400"> · picture from {sprite.uploadedByName}</span> : null}
        </dd>
        <dt className="text-ink-400">Used by</dt>
        <dd data-testid="sprite-used-by">
          {live.length === 0 ? <span className="text-ink-500">no effect</span> : null}
          {live.map((u, i) => (
            <span key={u.id}>
              {i > 0 ? ", " : ""}
              <Link to={`/effects/${u.id}`} className="text-glass-300 hover:text-glass-200">
                {u.name}
              </Link>
            </span>
          ))}
          {deleted.length > 0 ? (
            <span className="text-ink-500">
              {" "}
              (and {deleted.length} deleted effect{deleted.length === 1 ? "" : "s"})
            </span>
          ) : null}
        </dd>
      </dl>
      {sprite.kind === "indexed" ? <Palette sprite={sprite} /> : null}
      <div aria-live="polite">{message ? <Notice>{message}</Notice> : null}</div>
      <div className="flex flex-wrap items-start gap-2">
        <a href={spriteImageUrl(sprite)} download={sprite.name} className={buttonClass("secondary", "sm")}>
          Download PNG
        </a>
        {canEdit ? (
          <>
            <RenameBox sprite={sprite} action={action} fetcher={rename} />
            <ReplaceBox sprite={sprite} action={action} fetcher={replace} />
            <DeleteBox sprite={sprite} action={action} />
          </>
        ) : null}
      </div>
    </div>
  );
}

function Palette({ sprite }: { sprite: LibrarySprite }) {
  return (
    <div>
      <p className="mb-1.5 text-xs uppercase tracking-wide text-ink-400">Palette (index 0 is the background)</p>
      <ol className="flex flex-wrap gap-1" aria-label={`Palette of ${sprite.name}`}>
        {sprite.palette.map((c, i) => (
          <li
            key={i}
            title={`index ${i}: ${hex(c)}${c[3] === 255 ? "" : `, alpha ${c[3]}`}`}
            aria-label={`index ${i}: ${hex(c)}${c[3] === 255 ? "" : `, alpha ${c[3]}`}`}
            className="h-5 w-5 rounded-sm border border-ink-600 bg-[repeating-conic-gradient(#1d252d_0_25%,#12181e_0_50%)] bg-[length:6px_6px]"
          >
            <span className="block h-full w-full rounded-sm" style={{ background: `rgba(${c[0]}, ${c[1]}, ${c[2]}, ${c[3] / 255})` }} />
          </li>
        ))}
      </ol>
    </div>
  );
}

/** The fetchers of uploads and of deletions, shared with the library, which reports them. */
const UPLOAD_KEY = "upload-sprite";
const DELETE_KEY = "delete-sprite";

type Fetcher = ReturnType<typeof useFetcher<ActionResult>>;

/**
 * Calls `onAnswer` once for each new successful answer of a fetcher. It adjusts state while rendering (React's way of
 * reacting to a changed value without an effect), so `onAnswer` may only set state of the calling component.
 */
function useNewAnswer(fetcher: Fetcher, onAnswer: (answer: Extract<ActionResult, { ok: true }>) => void) {
  const [seen, setSeen] = useState(fetcher.data);
  if (fetcher.state === "idle" && fetcher.data !== seen) {
    setSeen(fetcher.data);
    if (fetcher.data?.ok) onAnswer(fetcher.data);
  }
}

/** A sprite form's field messages (answers about this sprite only), and its box closed once a change went through. */
function useSpriteForm(sprite: LibrarySprite, intent: string, fetcher: Fetcher) {
  const box = useRef<HTMLDetailsElement>(null);
  const result = fetcher.data;
  const errors = result && !result.ok && result.intent === intent && result.subject === sprite.id ? result.errors : undefined;
  useEffect(() => {
    if (fetcher.state === "idle" && result?.ok && box.current) box.current.open = false;
  }, [result, fetcher.state]);
  return { box, errors, busy: fetcher.state !== "idle" };
}

const SUMMARY = `${buttonClass("secondary", "sm")} list-none`;
/** A form that opens under its button, over the page rather than pushing it (left-aligned; `right-0` for the last one). */
const BOX =
  "absolute top-full z-20 mt-1 flex w-72 max-w-[calc(100vw-4rem)] flex-col gap-3 rounded-md border border-ink-600 bg-ink-850 p-3 shadow-lg shadow-black/40";

function Hidden({ sprite }: { sprite: LibrarySprite }) {
  return (
    <>
      <input type="hidden" name="spriteId" value={sprite.id} />
      <input type="hidden" name="version" value={sprite.version} />
    </>
  );
}

function RenameBox({ sprite, action, fetcher }: { sprite: LibrarySprite; action: string; fetcher: Fetcher }) {
  const { box, errors, busy } = useSpriteForm(sprite, "rename-sprite", fetcher);
  return (
    <details ref={box} open={errors ? true : undefined} className="relative">
      <summary className={SUMMARY}>Rename</summary>
      <fetcher.Form method="post" action={action} noValidate className={`${BOX} left-0`} aria-label={`Rename ${sprite.name}`}>
        <Hidden sprite={sprite} />
        <Field label="New name" name={`rename-sprite-${sprite.id}`} error={errors?.name}>
          <TextInput
            id={`rename-sprite-${sprite.id}`}
            name="name"
            defaultValue={sprite.name}
            maxLength={NAME_MAX}
            required
            error={errors?.name}
          />
        </Field>
        <FormError>{errors?.form ?? errors?.version}</FormError>
        <Button size="sm" variant="primary" name="intent" value="rename-sprite" disabled={busy}>
          Save name
        </Button>
      </fetcher.Form>
    </details>
  );
}

function ReplaceBox({ sprite, action, fetcher }: { sprite: LibrarySprite; action: string; fetcher: Fetcher }) {
  const { box, errors, busy } = useSpriteForm(sprite, "replace-sprite", fetcher);
  const [bad, setBad] = useState(false);
  const live = sprite.usedBy.filter((u) => !u.deleted).length;
  return (
    <details ref={box} open={errors ? true : undefined} className="relative">
      <summary className={SUMMARY}>Replace picture</summary>
      <fetcher.Form
        method="post"
        action={action}
        encType="multipart/form-data"
        noValidate
        className={`${BOX} left-0 w-80`}
        aria-label={`Replace the picture of ${sprite.name}`}
        onSubmit={(event) => {
          if (bad) event.preventDefault();
        }}
      >
        <Hidden sprite={sprite} />
        <DropZone
          id={`replace-file-${sprite.id}`}
          label="New PNG file"
          error={errors?.file}
          onChecked={(c) => setBad(Boolean(c?.error))}
          hint={
            <>
              Same sprite, new pixels:{" "}
              {live === 0 ? "no effect uses it yet." : `the ${live} effect${live === 1 ? "" : "s"} using it keep working.`} A new size must
              still fit each effect's canvas where the effect places it.
            </>
          }
        />
        <FormError>{errors?.form ?? errors?.version}</FormError>
        <Button size="sm" variant="primary" name="intent" value="replace-sprite" disabled={busy || bad}>
          {busy ? "Replacing…" : "Replace picture"}
        </Button>
      </fetcher.Form>
    </details>
  );
}

function DeleteBox({ sprite, action }: { sprite: LibrarySprite; action: string }) {
  const fetcher = useFetcher<ActionResult>({ key: DELETE_KEY });
  const { box, errors, busy } = useSpriteForm(sprite, "delete-sprite", fetcher);
  const live = sprite.usedBy.filter((u) => !u.deleted);
  const deleted = sprite.usedBy.length - live.length;
  return (
    <details ref={box} open={errors ? true : undefined} className="relative">
      <summary className={`${buttonClass("danger", "sm")} list-none border border-alert-400/40`}>Delete…</summary>
      <fetcher.Form method="post" action={action} className={`${BOX} right-0 w-80`} aria-label={`Delete ${sprite.name}`}>
        <Hidden sprite={sprite} />
        <input type="hidden" name="users" value={sprite.usedBy.map((u) => u.id).join(",")} />
        <p className="text-sm text-ink-200" data-testid="delete-sprite-warning">
          {sprite.usedBy.length === 0 ? (
            <>No effect uses {sprite.name}. Deleting it cannot be undone.</>
          ) : (
            <>
              {live.length > 0 ? (
                <>
                  {live.map((u) => u.name).join(", ")} use{live.length === 1 ? "s" : ""} {sprite.name}
                  {deleted ? ` (and ${deleted} deleted effect${deleted === 1 ? "" : "s"})` : ""}.{" "}
                </>
              ) : (
                <>Only deleted effects use {sprite.name}. </>
              )}
              {sprite.usedBy.length === 1
                ? "Deleting it detaches it from that effect: it keeps its settings, and its key pixels stay on the same canvas pixels."
                : "Deleting it detaches it from those effects: they keep their settings, and their key pixels stay on the same canvas pixels."}{" "}
              Deleting cannot be undone.
            </>
          )}
        </p>
        <FormError>{errors?.form ?? errors?.version}</FormError>
        <Button size="sm" variant="danger" name="intent" value="delete-sprite" disabled={busy} className="border border-alert-400/60">
          Delete {sprite.usedBy.length ? "and detach" : "sprite"}
        </Button>
      </fetcher.Form>
    </details>
  );
}
