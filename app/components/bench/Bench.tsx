/**
 * The effect bench: settings, preview, per-frame table, summary and export, around one draft. The route module loads
 * and saves; this composes the panels and keeps the view (frame, pass, zoom) in the address.
 */
import type { CanvasFit } from "@skewsmith/core";
import { useEffect, useMemo, useState } from "react";
import { Link } from "react-router";
import useSWR from "swr";
import type { KeyPixel } from "../../bench/draft.ts";
import { NO_OVERLAYS, type Overlays } from "../../bench/draw.ts";
import { growToFit } from "../../bench/fit.ts";
import type { FrameRow } from "../../bench/trackDiagnosis.ts";
import { useBenchWorker } from "../../bench/useBenchWorker.ts";
import { useFrameFeed } from "../../bench/useFrameFeed.ts";
import { useReducedMotion } from "../../bench/usePlayback.ts";
import { PASS_LABELS } from "../../bench/view.ts";
import type { loader } from "../../routes/effect.tsx";
import type { SavedDiagnostics } from "../../bench/saved.server.ts";
import { unpackDiagnostics } from "../../bench/savedWire.ts";
import { ProfileChangeNotice } from "../ProfileChangeNotice.tsx";
import { buttonClass, Crumbs, Notice, PageTitle, Panel, RoleBadge, Timestamp } from "../ui.tsx";
import { BenchSummary } from "./BenchSummary.tsx";
import { ClashNotice, ConflictNotice } from "./ConflictNotice.tsx";
import { ExportPanel } from "./ExportPanel.tsx";
import { FrameTable, short } from "./FrameTable.tsx";
import { LeaveGuard } from "./LeaveGuard.tsx";
import { Legend } from "./Legend.tsx";
import { PaletteHistogram } from "./PaletteHistogram.tsx";
import { PlayerControls, REDUCED_MOTION_MAX_RATE } from "./PlayerControls.tsx";
import { PreviewCanvas } from "./PreviewCanvas.tsx";
import { SettingsForm, type PointerMode, type SpriteChoice } from "./SettingsForm.tsx";
import { useBenchDraft } from "./useBenchDraft.ts";
import { useBenchView } from "./useBenchView.ts";

type Data = Awaited<ReturnType<typeof loader>>;

const json = <T,>(url: string): Promise<T> =>
  fetch(url, { credentials: "same-origin" }).then((r) => {
    if (!r.ok) throw new Error(`${url}: ${r.status}`);
    return r.json() as Promise<T>;
  });

export function Bench({ data }: { data: Data }) {
  const { effect, team, project, role, editable, profiles } = data;
  const sprites = useSWR<SpriteChoice[]>(`/projects/${project.id}/sprites.json`, json, {
    fallbackData: data.sprites as SpriteChoice[],
    revalidateOnMount: false,
  });
  const diagnostics = useMemo(() => unpackDiagnostics(data.diagnostics), [data.diagnostics]);
  const saved = useSWR<SavedDiagnostics>(`/effects/${effect.id}/diagnostics.json`, json, {
    fallbackData: diagnostics,
    revalidateOnMount: false,
  });
  const spriteList = useMemo(() => sprites.data ?? [], [sprites.data]);
  const names = useMemo(
    () => ({ profiles: new Map(profiles.map((p) => [p.id, p.name])), sprites: new Map(spriteList.map((s) => [s.id, s.name])) }),
    [profiles, spriteList],
  );
  const bench = useBenchDraft({ effectId: effect.id, version: effect.version, saved: data.saved, editable, names });
  const { draft } = bench;
  const doc = bench.lastValid.document;
  const worker = useBenchWorker();
  const reducedMotion = useReducedMotion();

  const [rate, setRate] = useState(50);
  const [overlays, setOverlays] = useState<Overlays>(NO_OVERLAYS);
  const [pointerMode, setPointerMode] = useState<PointerMode>("view");
  const [align, setAlign] = useState(1);
  const frames = worker.state.loaded?.frames ?? diagnostics.rows?.length ?? 1;
  // Playback runs at the chosen rate, held lower under reduced motion.
  const shownRate = reducedMotion ? Math.min(rate, REDUCED_MOTION_MAX_RATE) : rate;
  const { view, frame, playing, setPlaying, setPass, setZoom, jump, onKey } = useBenchView(data.view, frames, shownRate);

  // Revalidate what SWR holds after a save went through.
  useEffect(() => {
    if (bench.result?.ok) {
      void saved.mutate();
      void sprites.mutate();
    }
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [bench.result]);

  // The worker follows the last valid settings, a moment after typing stops.
  const loadInput = useMemo(() => {
    const s = bench.lastValid;
    return {
      document: s.document,
      sprite: s.spriteId ? { id: s.spriteId, url: `/sprites/${s.spriteId}/image.png` } : null,
      spriteX: s.spriteX,
      spriteY: s.spriteY,
      keyPixels: s.keyPixels,
      align,
    };
  }, [bench.lastValid, align]);
  const loadKey = JSON.stringify(loadInput);
  const load = worker.load;
  useEffect(() => {
    const timer = setTimeout(() => load(loadInput), 60);
    return () => clearTimeout(timer);
    // The key holds every input.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [loadKey]);

  // The frame shown: from the feed's cache, or asked of the worker (with the next ones asked ahead while playing).
  const wants = useMemo(
    () => ({ marks: overlays.marks, error: overlays.error, keys: overlays.keys }),
    [overlays.marks, overlays.error, overlays.keys],
  );
  const answer = useFrameFeed(
    worker.frame,
    worker.recycle,
    worker.state.loaded
      ? {
          generation: worker.state.generation,
          index: frame,
          pass: view.pass,
          zoom: view.zoom,
          shade: overlays.error,
          wants,
          frames,
          playing,
        }
      : null,
  );

  const loaded = worker.state.loaded;
  const placement = loaded?.sprite?.placement ?? null;
  const spriteSize = loaded?.sprite ?? null;
  const toggleKey = (x: number, y: number) => {
    const kx = placement ? x - placement.x : x;
    const ky = placement ? y - placement.y : y;
    if (spriteSize && (kx < 0 || ky < 0 || kx >= spriteSize.width || ky >= spriteSize.height)) return;
    const has = draft.keyPixels.some(([a, b]) => a === kx && b === ky);
    bench.change("keyPixels", has ? draft.keyPixels.filter(([a, b]) => a !== kx || b !== ky) : [...draft.keyPixels, [kx, ky] as KeyPixel]);
  };
  const choosePointer = (mode: PointerMode) => {
    setPointerMode(mode);
    if (mode === "keys") {
      setPlaying(false);
      setPass(0);
      setOverlays((o) => ({ ...o, keys: true }));
    }
    if (mode === "pivot") setOverlays((o) => ({ ...o, pivot: true }));
  };

  const followed = draft.followsProfile ? (profiles.find((p) => p.id === draft.targetProfileId)?.name ?? null) : null;
  const grow = (fit: CanvasFit) => {
    const g = growToFit(doc, fit, align);
    const patch: Partial<typeof draft> = {
      canvasWidth: String(g.width),
      canvasHeight: String(g.height),
      pivotX: String(g.pivot.x),
      pivotY: String(g.pivot.y),
      followsProfile: false,
    };
    if (placement) {
      patch.spriteX = String(placement.x + g.left);
      patch.spriteY = String(placement.y + g.top);
    } else patch.keyPixels = draft.keyPixels.map(([x, y]) => [x + g.left, y + g.top]);
    bench.changeMany(patch);
  };

  // Rows: the worker's for the draft; until it has any, the server's for the saved effect (when the draft is the saved one).
  const rows: FrameRow[] =
    worker.state.rows.length > 0 || worker.state.loaded ? worker.state.rows : !bench.dirty ? (saved.data?.rows ?? []) : [];
  const total = worker.state.loaded ? worker.state.total : (saved.data?.rows?.length ?? frames);
  const content = loaded?.content ?? saved.data?.content ?? doc.canvas.width * doc.canvas.height;
  const masked = loaded ? loaded.sprite !== null : (saved.data?.masked ?? false);
  const current = rows[frame] ?? null;
  const heading = masked
    ? `Per-frame diagnostics over the sprite's ${content.toLocaleString("en")} opaque pixels (errors, wrapped and clipped counts; transparent pixels do not count)`
    : `Per-frame diagnostics over all ${content.toLocaleString("en")} canvas pixels (no sprite attached)`;
  const description = `Frame ${frame} of ${frames - 1}${current ? `, ${short(current.written, 3)}°${current.flip ? " (half-turn flip)" : ""}` : ""}, ${PASS_LABELS[view.pass].toLowerCase()}, zoom ${view.zoom}×, ${doc.canvas.width} × ${doc.canvas.height} pixels.`;

  const savedRows = saved.data?.rows ?? null;
  const savedWorst = savedRows?.reduce((m, r) => Math.max(m, r.maxErrorPx), 0) ?? null;
  const savedWrapping = savedRows?.filter((r) => r.wrapped > 0 || r.clipped > 0).length ?? null;

  return (
    <div className="flex flex-col gap-5">
      <LeaveGuard dirty={bench.dirty && editable} />
      <div>
        <Crumbs
          items={[
            { label: "Home", to: "/" },
            { label: team.name, to: `/teams/${team.id}` },
            { label: project.name, to: `/projects/${project.id}` },
            { label: effect.name },
          ]}
        />
        <PageTitle
          title={effect.name}
          meta={
            <>
              <span className="num">v{effect.version}</span>
              <span>· saved</span>
              <Timestamp value={effect.updatedAt} />
              {data.updatedBy ? <span>by {data.updatedBy}</span> : null}
              <span>· your role</span>
              <RoleBadge role={role} />
            </>
          }
          actions={
            <>
              {data.saved.spriteId ? (
                <a href={`/effects/${effect.id}/frames.png`} className={buttonClass("secondary", "sm")} target="_blank" rel="noreferrer">
                  Contact sheet (PNG)
                </a>
              ) : null}
              <a href={`/effects/${effect.id}/document.json`} className={buttonClass("secondary", "sm")} download>
                Download effect document
              </a>
              {editable ? (
                <>
                  <span className="text-xs text-ink-300" role="status" data-testid="save-state">
                    {bench.saving
                      ? "Saving…"
                      : bench.dirty
                        ? `Unsaved edits on version ${bench.base.version}`
                        : bench.result?.ok
                          ? bench.result.message
                          : "No unsaved edits"}
                  </span>
                  {bench.dirty ? (
                    <button type="button" className={buttonClass("quiet", "sm")} onClick={bench.discard}>
                      Undo my edits
                    </button>
                  ) : null}
                  <button
                    type="submit"
                    form="bench-settings"
                    className={buttonClass("primary")}
                    disabled={!bench.dirty || bench.saving || bench.conflict !== null || !bench.state}
                  >
                    Save version {bench.base.version + 1}
                  </button>
                </>
              ) : null}
            </>
          }
        />
        <div className="flex flex-col gap-2">
          {effect.deletedAt ? (
            <Notice>
              This effect was deleted <Timestamp value={effect.deletedAt} />. Restore it from the project's “Recently deleted” list to
              change it; until then the bench is read-only.
            </Notice>
          ) : null}
          {project.archived ? <Notice>The project is archived; restore it to change this effect. The bench is read-only.</Notice> : null}
          {!editable && role === "viewer" ? (
            <Notice>
              <span data-testid="read-only-notice">
                You are a viewer in {team.name}: the bench is read-only. You can play, step and export, but not change or save.
              </span>
            </Notice>
          ) : null}
          {bench.restoredAt && !bench.conflict ? (
            <Notice>
              <span data-testid="restored-notice">
                Restored your unsaved edits from <Timestamp value={bench.restoredAt} />.{" "}
                <button type="button" className="underline" onClick={bench.discard}>
                  Drop them
                </button>
              </span>
            </Notice>
          ) : null}
          {bench.conflict ? (
            <ConflictNotice
              conflict={bench.conflict}
              startedFrom={bench.base.version}
              onKeepMine={bench.keepMine}
              onTakeTheirs={bench.takeTheirs}
            />
          ) : null}
          <ClashNotice clashes={bench.clashes} />
          <ProfileChangeNotice change={data.profileChange} teamId={team.id} />
          {!bench.state && bench.errors ? (
            <p className="rounded-md border border-alert-400/40 bg-alert-900/40 px-3 py-2 text-sm text-alert-300" role="status">
              Some settings are not valid (marked in the settings); the preview shows the last valid ones.
            </p>
          ) : null}
          {worker.state.error ? (
            <p className="rounded-md border border-alert-400/40 bg-alert-900/40 px-3 py-2 text-sm text-alert-300" role="alert">
              The preview could not be computed: {worker.state.error}
            </p>
          ) : null}
        </div>
      </div>

      <div className="grid items-start gap-5 lg:grid-cols-[19rem_minmax(0,1fr)] xl:grid-cols-[21rem_minmax(0,1fr)]">
        <aside
          aria-label="Settings"
          className="lg:sticky lg:top-3 lg:max-h-[calc(100vh-1.5rem)] lg:overflow-y-auto lg:overscroll-contain"
          data-testid="settings-column"
        >
          <Panel title="Settings" id="settings">
            <div>
              <SettingsForm
                draft={draft}
                errors={bench.errors}
                change={bench.change}
                changeMany={bench.changeMany}
                readOnly={!editable}
                profiles={profiles}
                sprites={spriteList}
                pointerMode={pointerMode}
                setPointerMode={choosePointer}
                onSubmit={bench.save}
              />
            </div>
          </Panel>
        </aside>
        <div className="flex min-w-0 flex-col gap-5">
          <Panel title="Preview" id="preview">
            <div className="flex flex-col gap-4">
              <PlayerControls
                frame={frame}
                frames={frames}
                pass={view.pass}
                zoom={view.zoom}
                playing={playing}
                rate={shownRate}
                reducedMotion={reducedMotion}
                overlays={overlays}
                onFrame={jump}
                onPass={setPass}
                onZoom={setZoom}
                onPlay={setPlaying}
                onRate={setRate}
                onOverlay={(name, on) => setOverlays((o) => ({ ...o, [name]: on }))}
                frameHref={`/effects/${effect.id}/frames/${frame}.png?pass=${view.pass}`}
              />
              <div className="flex flex-wrap items-start gap-5">
                <div className="flex min-w-0 flex-col gap-3">
                  <PreviewCanvas
                    answer={answer}
                    width={doc.canvas.width}
                    height={doc.canvas.height}
                    zoom={view.zoom}
                    pivot={doc.pivot}
                    outline={loaded?.outline ?? null}
                    overlays={overlays}
                    mode={pointerMode}
                    description={description}
                    onPlacePivot={(x, y) => bench.changeMany({ pivotX: String(x), pivotY: String(y) })}
                    onToggleKey={toggleKey}
                    onKey={onKey}
                  />
                  {pointerMode !== "view" ? (
                    <div className="flex items-center gap-2 text-xs text-glass-200">
                      {pointerMode === "pivot" ? "Placing the pivot." : "Marking key pixels on the source."}
                      <button type="button" className={buttonClass("secondary", "sm")} onClick={() => setPointerMode("view")}>
                        Done
                      </button>
                    </div>
                  ) : null}
                  <Legend overlays={overlays} picture={answer?.picture ?? null} pass={view.pass} edges={doc.edges} />
                </div>
                <div className="min-w-[15rem] max-w-md flex-1">
                  <h3 className="mb-1.5 text-xs font-semibold uppercase tracking-wide text-ink-300">Palette: source and this frame</h3>
                  <PaletteHistogram
                    source={loaded?.sourceColours ?? []}
                    frame={answer?.picture.colours ?? null}
                    indexed={loaded?.sprite ? loaded.sprite.kind === "indexed" : true}
                  />
                </div>
              </div>
            </div>
          </Panel>

          <Panel title="Frames" id="frames">
            <div className="flex flex-col gap-4">
              <BenchSummary
                rows={rows}
                total={total}
                effect={doc}
                fit={worker.state.fit}
                align={align}
                onAlign={setAlign}
                onGrow={grow}
                canEdit={editable}
                followedProfile={followed}
                masked={masked}
                onJump={jump}
              />
              {bench.dirty && savedRows ? (
                <p className="text-xs text-ink-400" data-testid="saved-comparison">
                  Saved version {saved.data?.version}: worst error {savedWorst?.toFixed(3)} px, {savedWrapping} of {savedRows.length} frames
                  wrap or clip (measured on the server).
                </p>
              ) : null}
              <FrameTable rows={rows} total={total} current={frame} onJump={jump} heading={heading} following={!playing} />
              {worker.state.diagnosedMs !== null ? (
                <p className="num text-xs text-ink-500">Measured in your browser in {worker.state.diagnosedMs.toFixed(0)} ms.</p>
              ) : null}
            </div>
          </Panel>
        </div>
      </div>

      <Panel title="Export" id="export">
        <ExportPanel
          worker={worker}
          document={doc}
          effectId={effect.id}
          effectName={effect.name}
          defaults={data.exportDefaults}
          savedVersion={effect.version}
          dirty={bench.dirty}
        />
      </Panel>

      <p className="text-sm text-ink-400">
        <Link to={`/projects/${project.id}`} className="hover:text-glass-300">
          ← Back to {project.name}
        </Link>
      </p>
    </div>
  );
}
