/**
 * The bench's settings: target profile, canvas and pivot, angle track, fixed point and rules, sprite and placement,
 * key pixels. Every field shows core's message for a bad value beside it; the Q notation follows the bits live.
 */
import { angleTrack, EASINGS, EDGES, HALF_TURNS, LIMITS, ROUNDINGS } from "@skewsmith/core";
import { PROFILE_FIELDS, type BenchDraft } from "../../bench/draft.ts";
import { badLines, type BenchErrors } from "../../bench/form.ts";
import { qNotation } from "../../effects/display.ts";
import type { ProfileSettings } from "../../effects/settings.ts";
import { AngleTrackEditor } from "./AngleTrackEditor.tsx";
import { BenchSection, CheckField, SelectField, TextField } from "./fields.tsx";
import { buttonClass } from "../ui.tsx";

export interface ProfileChoice extends ProfileSettings {
  id: string;
  name: string;
}

export interface SpriteChoice {
  id: string;
  name: string;
  width: number;
  height: number;
}

export type PointerMode = "view" | "pivot" | "keys";

const ROUNDING_HINT: Record<string, string> = {
  "nearest-away": "round half away from zero (symmetric)",
  "nearest-up": "add one half, then shift right",
  floor: "a plain arithmetic shift right",
  trunc: "toward zero",
};

const HALF_TURN_HINT: Record<string, string> = {
  flip: "beyond ±90° mirror both axes first (free on most hardware), then shear the rest",
  shear: "shears only; near ±180° the coefficients grow and saturate",
};

const EDGE_HINT: Record<string, string> = {
  wrap: "pixels leaving one edge come back at the other, like a hardware scroll plane",
  clip: "pixels leaving the canvas are dropped",
};

/** Q notation and what the format can hold, for the live hint under the fraction bits. */
function fixedPointHint(bits: string, fraction: string): string | null {
  const b = Number(bits);
  const f = Number(fraction);
  if (!(LIMITS.bits as readonly number[]).includes(b) || !Number.isInteger(f) || f < 0 || f >= b) return null;
  const step = 2 ** -f;
  const top = 2 ** (b - 1 - f);
  return `${qNotation({ bits: b, fraction: f })}: steps of 1/${2 ** f} (${step}), from −${top} to ${top - step}`;
}

export function SettingsForm({
  draft,
  errors,
  change,
  changeMany,
  readOnly,
  profiles,
  sprites,
  pointerMode,
  setPointerMode,
  onSubmit,
}: {
  draft: BenchDraft;
  errors: BenchErrors | undefined;
  change: <F extends keyof BenchDraft>(field: F, value: BenchDraft[F]) => void;
  changeMany: (patch: Partial<BenchDraft>) => void;
  readOnly: boolean;
  profiles: ProfileChoice[];
  sprites: SpriteChoice[];
  pointerMode: PointerMode;
  setPointerMode: (mode: PointerMode) => void;
  onSubmit: () => void;
}) {
  const profile = profiles.find((p) => p.id === draft.targetProfileId) ?? null;
  const locked = readOnly || (profile !== null && draft.followsProfile);
  const lockHint = profile && draft.followsProfile ? `from the profile ${profile.name}` : undefined;
  const sprite = sprites.find((s) => s.id === draft.spriteId) ?? null;
  const qHint = fixedPointHint(draft.fixedPointBits, draft.fixedPointFraction);
  const lines = badLines(errors);

  const fillFromProfile = (p: ProfileChoice) => {
    const patch: Partial<BenchDraft> = {};
    for (const field of PROFILE_FIELDS) patch[field] = String(p[field]);
    // Keep the pivot where it was when the new canvas still holds it; centre it otherwise.
    const px = Number(draft.pivotX);
    const py = Number(draft.pivotY);
    if (!(px >= 0 && px <= p.canvasWidth)) patch.pivotX = String(p.canvasWidth / 2);
    if (!(py >= 0 && py <= p.canvasHeight)) patch.pivotY = String(p.canvasHeight / 2);
    return patch;
  };

  const chooseProfile = (id: string) => {
    const p = profiles.find((x) => x.id === id) ?? null;
    if (!p) changeMany({ targetProfileId: "", followsProfile: false });
    else changeMany({ targetProfileId: id, followsProfile: true, ...fillFromProfile(p) });
  };

  const toList = () => {
    // Start the list from the sweep's own angles, so switching changes nothing until the list is edited.
    let list = draft.angleList;
    const frames = Number(draft.sweepFrames);
    if (list.trim() === "" && Number.isInteger(frames) && frames >= 1 && frames <= LIMITS.frames.max) {
      const angles = angleTrack({
        sweep: {
          from: Number(draft.sweepFrom) || 0,
          to: Number(draft.sweepTo) || 0,
          frames,
          easing: (EASINGS as readonly string[]).includes(draft.sweepEasing) ? (draft.sweepEasing as (typeof EASINGS)[number]) : "linear",
          includeEnd: draft.sweepIncludeEnd,
        },
      });
      list = angles.map((a) => String(Math.round(a * 1e6) / 1e6)).join("\n");
    }
    changeMany({ angleMode: "list", angleList: list });
  };

  return (
    <form
      id="bench-settings"
      aria-label="Effect settings"
      noValidate
      onSubmit={(e) => {
        e.preventDefault();
        onSubmit();
      }}
      className="flex flex-col gap-4"
    >
      {errors?.form ? (
        <p role="alert" className="rounded-md border border-alert-400/40 bg-alert-900/60 px-3 py-2 text-sm text-alert-300">
          {errors.form}
        </p>
      ) : null}

      <BenchSection title="Target profile">
        <SelectField
          name="targetProfileId"
          label="Profile"
          value={draft.targetProfileId}
          onChange={chooseProfile}
          disabled={readOnly}
          errors={errors}
          options={[{ value: "", label: "None: the effect's own settings" }, ...profiles.map((p) => ({ value: p.id, label: p.name }))]}
        />
        {profile ? (
          <CheckField
            name="followsProfile"
            label={`Follow ${profile.name}`}
            checked={draft.followsProfile}
            disabled={readOnly}
            onChange={(follow) => changeMany(follow ? { followsProfile: true, ...fillFromProfile(profile) } : { followsProfile: false })}
            hint={
              draft.followsProfile
                ? "Canvas size and arithmetic come from the profile, and its changes flow into this effect. Untick to set them here."
                : "Detached: the effect keeps its own canvas and arithmetic; the profile still gives the export defaults."
            }
          />
        ) : null}
      </BenchSection>

      <BenchSection title="Canvas and pivot">
        <div className="grid grid-cols-2 gap-3">
          <TextField
            name="canvasWidth"
            label="Width"
            suffix="px"
            value={draft.canvasWidth}
            onChange={(v) => change("canvasWidth", v)}
            errors={errors}
            readOnly={locked}
            hint={lockHint}
            inputMode="numeric"
          />
          <TextField
            name="canvasHeight"
            label="Height"
            suffix="px"
            value={draft.canvasHeight}
            onChange={(v) => change("canvasHeight", v)}
            errors={errors}
            readOnly={locked}
            inputMode="numeric"
          />
          <TextField
            name="pivotX"
            label="Pivot x"
            value={draft.pivotX}
            onChange={(v) => change("pivotX", v)}
            errors={errors}
            readOnly={readOnly}
          />
          <TextField
            name="pivotY"
            label="Pivot y"
            value={draft.pivotY}
            onChange={(v) => change("pivotY", v)}
            errors={errors}
            readOnly={readOnly}
          />
        </div>
        <p className="text-xs text-ink-400">
          Pixel-edge coordinates in steps of 0.5: a whole number is a corner between pixels, a half (say 15.5) the centre of a pixel.
        </p>
        {readOnly ? null : (
          <div className="flex flex-wrap gap-2">
            <button
              type="button"
              className={buttonClass(pointerMode === "pivot" ? "primary" : "secondary", "sm")}
              aria-pressed={pointerMode === "pivot"}
              onClick={() => setPointerMode(pointerMode === "pivot" ? "view" : "pivot")}
            >
              Place the pivot on the preview
            </button>
            <button
              type="button"
              className={buttonClass("quiet", "sm")}
              onClick={() =>
                changeMany({ pivotX: String(Number(draft.canvasWidth) / 2 || 0), pivotY: String(Number(draft.canvasHeight) / 2 || 0) })
              }
            >
              Centre the pivot
            </button>
          </div>
        )}
      </BenchSection>

      <BenchSection title="Angle track">
        <div role="radiogroup" aria-label="Kind of angle track" className="flex gap-4 text-sm">
          {(["sweep", "list"] as const).map((mode) => (
            <label key={mode} className="inline-flex items-center gap-1.5 text-ink-200">
              <input
                type="radio"
                name="angleMode"
                value={mode}
                checked={draft.angleMode === mode}
                disabled={readOnly}
                onChange={() => (mode === "list" ? toList() : change("angleMode", "sweep"))}
                className="accent-glass-400"
              />
              {mode === "sweep" ? "Sweep" : "List, one angle per line"}
            </label>
          ))}
        </div>
        {draft.angleMode === "sweep" ? (
          <>
            <div className="grid grid-cols-3 gap-3">
              <TextField
                name="sweepFrom"
                label="From"
                suffix="°"
                value={draft.sweepFrom}
                onChange={(v) => change("sweepFrom", v)}
                errors={errors}
                readOnly={readOnly}
              />
              <TextField
                name="sweepTo"
                label="To"
                suffix="°"
                value={draft.sweepTo}
                onChange={(v) => change("sweepTo", v)}
                errors={errors}
                readOnly={readOnly}
              />
              <TextField
                name="sweepFrames"
                label="Frames"
                value={draft.sweepFrames}
                onChange={(v) => change("sweepFrames", v)}
                errors={errors}
                readOnly={readOnly}
                inputMode="numeric"
              />
            </div>
            <div className="grid grid-cols-2 items-end gap-3">
              <SelectField
                name="sweepEasing"
                label="Easing"
                value={draft.sweepEasing}
                onChange={(v) => change("sweepEasing", v)}
                disabled={readOnly}
                errors={errors}
                options={EASINGS.map((e) => ({ value: e, label: e }))}
              />
              <CheckField
                name="sweepIncludeEnd"
                label="Last frame at “to”"
                checked={draft.sweepIncludeEnd}
                disabled={readOnly}
                onChange={(v) => change("sweepIncludeEnd", v)}
              />
            </div>
          </>
        ) : (
          <div>
            <p id="angleList-label" className="mb-1 text-xs font-medium text-ink-300">
              Angles in degrees, one per line (blank lines are skipped)
            </p>
            <AngleTrackEditor
              value={draft.angleList}
              onChange={(v) => change("angleList", v)}
              badLines={lines}
              readOnly={readOnly}
              labelledBy="angleList-label"
              describedBy={errors?.angleList && lines.length === 0 ? "angleList-error" : undefined}
            />
            {errors?.angleList && lines.length === 0 ? (
              <p id="angleList-error" className="mt-1 text-xs text-alert-300" data-testid="error-angleList">
                {errors.angleList}
              </p>
            ) : null}
          </div>
        )}
      </BenchSection>

      <BenchSection title="Fixed point and rules">
        <div className="grid grid-cols-2 gap-3">
          <SelectField
            name="fixedPointBits"
            label="Bits"
            value={draft.fixedPointBits}
            onChange={(v) => change("fixedPointBits", v)}
            disabled={locked}
            errors={errors}
            options={LIMITS.bits.map((b) => ({ value: String(b), label: `${b} bits` }))}
          />
          <TextField
            name="fixedPointFraction"
            label="Fraction bits"
            value={draft.fixedPointFraction}
            onChange={(v) => change("fixedPointFraction", v)}
            errors={errors}
            readOnly={locked}
            inputMode="numeric"
          />
        </div>
        <p className="num text-xs text-glass-300" aria-live="polite" data-testid="q-notation">
          {qHint ?? "Q notation appears once bits and fraction bits are valid."}
        </p>
        <SelectField
          name="rounding"
          label="Rounding"
          value={draft.rounding}
          onChange={(v) => change("rounding", v)}
          disabled={locked}
          errors={errors}
          hint={ROUNDING_HINT[draft.rounding]}
          options={ROUNDINGS.map((r) => ({ value: r, label: r }))}
        />
        <div className="grid grid-cols-2 gap-3">
          <SelectField
            name="halfTurn"
            label="Half-turn rule"
            value={draft.halfTurn}
            onChange={(v) => change("halfTurn", v)}
            disabled={locked}
            errors={errors}
            options={HALF_TURNS.map((r) => ({ value: r, label: r }))}
          />
          <SelectField
            name="edges"
            label="Edges"
            value={draft.edges}
            onChange={(v) => change("edges", v)}
            disabled={locked}
            errors={errors}
            options={EDGES.map((r) => ({ value: r, label: r }))}
          />
        </div>
        <p className="text-xs text-ink-400">
          {HALF_TURN_HINT[draft.halfTurn]}; {EDGE_HINT[draft.edges]}.
        </p>
        <TextField
          name="columnGroup"
          label="Column group"
          suffix="px"
          value={draft.columnGroup}
          onChange={(v) => change("columnGroup", v)}
          errors={errors}
          readOnly={locked}
          inputMode="numeric"
          hint="Columns the hardware scrolls together (1 = every column on its own)."
        />
      </BenchSection>

      <BenchSection title="Sprite">
        <SelectField
          name="spriteId"
          label="Attached sprite"
          value={draft.spriteId}
          onChange={(v) => changeMany({ spriteId: v, spriteX: "", spriteY: "", keyPixels: [] })}
          disabled={readOnly}
          errors={errors}
          hint={sprites.length === 0 ? "The project has no sprites yet; upload one on the project page." : undefined}
          options={[
            { value: "", label: "None: a test card fills the canvas" },
            ...sprites.map((s) => ({ value: s.id, label: `${s.name} (${s.width} × ${s.height})` })),
          ]}
        />
        {sprite ? (
          <>
            <div className="grid grid-cols-2 gap-3">
              <TextField
                name="spriteX"
                label="Left edge x"
                suffix="px"
                value={draft.spriteX}
                placeholder="centred"
                onChange={(v) => change("spriteX", v)}
                errors={errors}
                readOnly={readOnly}
                inputMode="numeric"
              />
              <TextField
                name="spriteY"
                label="Top edge y"
                suffix="px"
                value={draft.spriteY}
                placeholder="centred"
                onChange={(v) => change("spriteY", v)}
                errors={errors}
                readOnly={readOnly}
                inputMode="numeric"
              />
            </div>
            <p className="text-xs text-ink-400">Where the sprite's top-left pixel sits in the canvas; leave empty to centre it.</p>
            {readOnly ? null : (
              <button
                type="button"
                className={`${buttonClass("quiet", "sm")} self-start`}
                onClick={() => changeMany({ spriteX: "", spriteY: "" })}
              >
                Centre the sprite
              </button>
            )}
          </>
        ) : null}
      </BenchSection>

      <BenchSection title="Key pixels">
        <p className="text-sm text-ink-300" data-testid="key-pixel-count">
          {draft.keyPixels.length === 0
            ? "None marked. Mark the pixels that must read well (an eye, a button, a needle's tip) to follow them on every frame."
            : `${draft.keyPixels.length} marked, in ${sprite ? "sprite" : "canvas"} pixels: ${draft.keyPixels
                .slice(0, 12)
                .map(([x, y]) => `(${x}, ${y})`)
                .join(" ")}${draft.keyPixels.length > 12 ? " …" : ""}`}
        </p>
        {errors?.keyPixels ? <p className="text-xs text-alert-300">{errors.keyPixels}</p> : null}
        {readOnly ? null : (
          <div className="flex flex-wrap gap-2">
            <button
              type="button"
              className={buttonClass(pointerMode === "keys" ? "primary" : "secondary", "sm")}
              aria-pressed={pointerMode === "keys"}
              onClick={() => setPointerMode(pointerMode === "keys" ? "view" : "keys")}
            >
              Mark key pixels on the source
            </button>
            {draft.keyPixels.length > 0 ? (
              <button type="button" className={buttonClass("quiet", "sm")} onClick={() => change("keyPixels", [])}>
                Clear key pixels
              </button>
            ) : null}
          </div>
        )}
      </BenchSection>
    </form>
  );
}
