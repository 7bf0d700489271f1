import { compileShifts } from "@skewsmith/core";
import type { ReactNode } from "react";
import { Link } from "react-router";
import type { Route } from "./+types/effect";
import { SpriteFacts, SpriteImage } from "../components/Sprite.tsx";
import { buttonClass, Crumbs, Notice, PageTitle, Panel, RoleBadge, Timestamp } from "../components/ui.tsx";
import { db } from "../db.server.ts";
import { describeAngles, qNotation } from "../effects/display.ts";
import { requireEffectRole } from "../guards.server.ts";
import { validDocument } from "../models/effects.server.ts";
import { listSprites } from "../models/sprites.server.ts";
import { getTargetProfile } from "../models/targetProfiles.server.ts";
import { getUser, displayName } from "../models/users.server.ts";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.effect.name ?? "Effect"} · Skewsmith` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { team, project, effect, role } = await requireEffectRole(request, params.effectId, "viewer");
  // Stored documents were validated on the way in; validating again fills any default a newer core adds.
  const document = validDocument(effect.document);
  const [profile, sprites, updatedBy] = await Promise.all([
    effect.targetProfileId ? getTargetProfile(db(), effect.targetProfileId) : null,
    listSprites(db(), project.id),
    effect.updatedBy ? getUser(db(), effect.updatedBy) : null,
  ]);
  // The tables come from core; the app only summarises them.
  const { elementType, frames } = compileShifts(document);
  const summary = {
    frames: frames.length,
    elementType,
    flipped: frames.filter((f) => f.flip).length,
    saturated: frames.filter((f) => f.saturated).length,
    maxAbsShift: frames.reduce((m, f) => Math.max(m, f.maxAbsShift), 0),
    minDegrees: Math.min(...frames.map((f) => f.degrees)),
    maxDegrees: Math.max(...frames.map((f) => f.degrees)),
  };
  const sprite = sprites.find((s) => s.id === effect.spriteId) ?? null;
  return {
    team: { id: team.id, name: team.name },
    project: { id: project.id, name: project.name, archived: project.archivedAt !== null },
    effect: { id: effect.id, name: effect.name, version: effect.version, updatedAt: effect.updatedAt, deletedAt: effect.deletedAt },
    updatedBy: updatedBy ? displayName(updatedBy) : null,
    role,
    document,
    profile: profile ? { name: profile.name, dialects: profile.dialects, labelPrefix: profile.labelPrefix } : null,
    sprite,
    summary,
  };
}

function Setting({ label, children, hint }: { label: string; children: ReactNode; hint?: string }) {
  return (
    <div className="flex flex-col gap-0.5 border-b border-ink-800 py-2.5 last:border-0 sm:flex-row sm:items-baseline sm:gap-4">
      <dt className="w-40 shrink-0 text-xs uppercase tracking-wide text-ink-400">{label}</dt>
      <dd className="text-ink-100">
        {children}
        {hint ? <span className="ml-2 text-xs text-ink-500">{hint}</span> : null}
      </dd>
    </div>
  );
}

const fmt = (n: number) => (Number.isInteger(n) ? String(n) : n.toFixed(3).replace(/0+$/, ""));

export default function EffectPage({ loaderData }: Route.ComponentProps) {
  const { team, project, effect, updatedBy, role, document: doc, profile, sprite, summary } = loaderData;
  return (
    <div className="flex flex-col gap-8">
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
              <span>· changed</span>
              <Timestamp value={effect.updatedAt} />
              {updatedBy ? <span>by {updatedBy}</span> : null}
              <span>· your role</span>
              <RoleBadge role={role} />
            </>
          }
          actions={
            <>
              {sprite ? (
                <a href={`/effects/${effect.id}/frames.png`} className={buttonClass("secondary")} target="_blank" rel="noreferrer">
                  Contact sheet (PNG)
                </a>
              ) : null}
              <a href={`/effects/${effect.id}/document.json`} className={buttonClass("secondary")} download>
                Download effect document
              </a>
            </>
          }
        />
        {effect.deletedAt ? (
          <Notice>
            This effect was deleted <Timestamp value={effect.deletedAt} />. It can be restored from the project's “Recently deleted” list.
          </Notice>
        ) : null}
        {project.archived ? <Notice>The project is archived; restore it to change this effect.</Notice> : null}
      </div>

      <div className="grid gap-8 lg:grid-cols-[3fr_2fr]">
        <Panel title="Settings" id="settings">
          <dl>
            <Setting label="Target profile">{profile ? profile.name : <span className="text-ink-400">its own settings</span>}</Setting>
            <Setting label="Canvas">
              <span className="num">
                {doc.canvas.width} × {doc.canvas.height}
              </span>{" "}
              px
            </Setting>
            <Setting label="Pivot" hint="pixel-edge coordinates">
              <span className="num">
                ({fmt(doc.pivot.x)}, {fmt(doc.pivot.y)})
              </span>
            </Setting>
            <Setting label="Angle track">{describeAngles(doc.angles)}</Setting>
            <Setting label="Fixed point" hint={`${doc.fixedPoint.bits} bits, ${doc.fixedPoint.fraction} fraction`}>
              <span className="num">{qNotation(doc.fixedPoint)}</span>
            </Setting>
            <Setting label="Rounding">{doc.rounding}</Setting>
            <Setting label="Half-turn" hint={doc.halfTurn === "flip" ? "beyond ±90° the frame mirrors both axes first" : "shears only"}>
              {doc.halfTurn}
            </Setting>
            <Setting label="Edges">{doc.edges}</Setting>
            <Setting label="Column group" hint="pixels scrolled together by the column pass">
              <span className="num">{doc.columnGroup}</span>
            </Setting>
            {profile && profile.dialects.length > 0 ? (
              <Setting label="Export">
                {profile.dialects.join(", ")}
                {profile.labelPrefix ? <span className="num ml-2 text-ink-400">labels {profile.labelPrefix}*</span> : null}
              </Setting>
            ) : null}
          </dl>
        </Panel>

        <div className="flex flex-col gap-8">
          <Panel title="Shift tables at a glance" id="tables">
            <dl className="grid grid-cols-2 gap-x-4 gap-y-3 text-sm">
              <dt className="text-ink-400">Frames</dt>
              <dd className="num text-right" data-testid="frame-count">
                {summary.frames}
              </dd>
              <dt className="text-ink-400">Angles</dt>
              <dd className="num text-right">
                {fmt(summary.minDegrees)}° … {fmt(summary.maxDegrees)}°
              </dd>
              <dt className="text-ink-400">Element type</dt>
              <dd className="num text-right">{summary.elementType}</dd>
              <dt className="text-ink-400">Largest shift</dt>
              <dd className="num text-right">{summary.maxAbsShift} px</dd>
              <dt className="text-ink-400">Half-turn flips</dt>
              <dd className="num text-right">{summary.flipped}</dd>
              <dt className="text-ink-400">Saturated frames</dt>
              <dd className={`num text-right ${summary.saturated ? "text-alert-300" : ""}`}>{summary.saturated}</dd>
            </dl>
          </Panel>
          <Panel title="Sprite" id="sprite">
            {sprite ? (
              <figure className="flex items-center gap-4">
                <SpriteImage
                  sprite={sprite}
                  className="max-h-40 max-w-56"
                  style={{ width: Math.min(224, sprite.width * Math.max(1, Math.floor(160 / sprite.height))) }}
                />
                <figcaption className="text-sm">
                  <SpriteFacts sprite={sprite} />
                </figcaption>
              </figure>
            ) : (
              <p className="text-sm text-ink-400">No sprite is attached; the effect works on its canvas alone.</p>
            )}
          </Panel>
        </div>
      </div>

      <Panel title="Effect document" id="document" actions={<span className="num text-xs text-ink-500">{doc.format}</span>}>
        <p className="mb-3 text-sm text-ink-400">
          Validated by the core with every default filled in: what the CLI reads and what exports are computed from.
        </p>
        <pre
          className="num max-h-96 overflow-auto rounded-md bg-ink-950 p-4 text-xs leading-relaxed text-ink-200"
          data-testid="effect-document"
        >
          {JSON.stringify(doc, null, 2)}
        </pre>
      </Panel>

      <p className="text-sm text-ink-400">
        <Link to={`/projects/${project.id}`} className="hover:text-glass-300">
          ← Back to {project.name}
        </Link>
      </p>
    </div>
  );
}
