/** Play, pause, step and scrub the frames; step through the passes; zoom; the overlays. Every control named for a screen reader. */
import type { Overlays } from "../../bench/draw.ts";
import { PASS_LABELS, PASSES, ZOOM_MAX, ZOOM_MIN, type Pass } from "../../bench/view.ts";
import { buttonClass } from "../ui.tsx";

/** Playback rates in frames per second: the two television rates, then slower ones for looking closely. */
export const RATES = [60, 50, 30, 25, 12, 6, 2, 1] as const;
/** The fastest rate offered while the system asks for reduced motion. */
export const REDUCED_MOTION_MAX_RATE = 6;

const OVERLAY_LABELS: [keyof Overlays, string][] = [
  ["grid", "Pixel grid"],
  ["pivot", "Pivot"],
  ["edge", "Canvas edge"],
  ["ideal", "Ideal turn"],
  ["error", "Error shading"],
  ["marks", "Wrapped and clipped"],
  ["keys", "Key pixels"],
];

export function PlayerControls({
  frame,
  frames,
  pass,
  zoom,
  playing,
  rate,
  reducedMotion,
  overlays,
  onFrame,
  onPass,
  onZoom,
  onPlay,
  onRate,
  onOverlay,
  frameHref,
}: {
  frame: number;
  frames: number;
  pass: Pass;
  zoom: number;
  playing: boolean;
  rate: number;
  reducedMotion: boolean;
  overlays: Overlays;
  onFrame: (frame: number) => void;
  onPass: (pass: Pass) => void;
  onZoom: (zoom: number) => void;
  onPlay: (playing: boolean) => void;
  onRate: (rate: number) => void;
  onOverlay: (name: keyof Overlays, on: boolean) => void;
  frameHref: string;
}) {
  const last = Math.max(0, frames - 1);
  const rates = reducedMotion ? RATES.filter((r) => r <= REDUCED_MOTION_MAX_RATE) : RATES;
  return (
    <div className="flex flex-col gap-3" data-testid="player-controls">
      <div className="flex flex-wrap items-center gap-2">
        <button
          type="button"
          className={buttonClass("primary", "sm")}
          onClick={() => onPlay(!playing)}
          aria-pressed={playing}
          disabled={frames < 2}
        >
          {playing ? "Pause" : "Play"}
        </button>
        <button type="button" className={buttonClass("secondary", "sm")} onClick={() => onFrame(frame === 0 ? last : frame - 1)}>
          <span aria-hidden="true">◀ </span>Previous frame
        </button>
        <button type="button" className={buttonClass("secondary", "sm")} onClick={() => onFrame(frame === last ? 0 : frame + 1)}>
          Next frame<span aria-hidden="true"> ▶</span>
        </button>
        <label className="flex items-center gap-1.5 text-xs text-ink-300">
          Speed
          <select
            value={rate}
            onChange={(e) => onRate(Number(e.target.value))}
            className="rounded border border-ink-600 bg-ink-900 px-1.5 py-1 text-xs text-ink-100"
          >
            {rates.map((r) => (
              <option key={r} value={r}>
                {r} fps
              </option>
            ))}
          </select>
        </label>
        <p className="text-xs text-ink-400" role="note" data-testid="photosensitivity-caution">
          Caution: fast spinning or flashing can trigger seizures in people with photosensitive epilepsy.
          {reducedMotion ? ` Your system asks for reduced motion, so playing is held to ${REDUCED_MOTION_MAX_RATE} fps or slower.` : ""}
        </p>
      </div>

      <div className="flex items-center gap-3">
        <label htmlFor="frame-slider" className="shrink-0 text-xs text-ink-300">
          Frame
        </label>
        <input
          id="frame-slider"
          type="range"
          min={0}
          max={last}
          step={1}
          value={frame}
          onChange={(e) => onFrame(Number(e.target.value))}
          aria-valuetext={`Frame ${frame} of ${last}`}
          className="w-full accent-glass-400"
        />
        <span className="num w-24 shrink-0 text-right text-xs text-ink-200" data-testid="frame-number">
          {frame} / {last}
        </span>
      </div>

      <div className="flex flex-wrap items-center gap-x-5 gap-y-2">
        <div role="radiogroup" aria-label="Pass" className="flex flex-wrap items-center gap-1">
          <span className="mr-1 text-xs text-ink-300" aria-hidden="true">
            Pass
          </span>
          {PASSES.map((p) => (
            <label
              key={p}
              className={`cursor-pointer rounded border px-2 py-1 text-xs has-[:focus-visible]:outline has-[:focus-visible]:outline-2 has-[:focus-visible]:outline-glass-400 ${pass === p ? "border-glass-400 bg-glass-900 text-glass-200" : "border-ink-600 text-ink-300 hover:border-ink-400"}`}
              title={PASS_LABELS[p]}
            >
              <input
                type="radio"
                name="pass"
                value={p}
                checked={pass === p}
                onChange={() => onPass(p)}
                className="sr-only"
                aria-label={`Pass ${p}: ${PASS_LABELS[p]}`}
              />
              {p} {p === 0 ? "source" : p === 1 ? "rows" : p === 2 ? "columns" : "rows: frame"}
            </label>
          ))}
        </div>
        <label className="flex items-center gap-1.5 text-xs text-ink-300">
          Zoom
          <select
            value={zoom}
            onChange={(e) => onZoom(Number(e.target.value))}
            className="rounded border border-ink-600 bg-ink-900 px-1.5 py-1 text-xs text-ink-100"
          >
            {Array.from({ length: ZOOM_MAX - ZOOM_MIN + 1 }, (_, i) => i + ZOOM_MIN).map((z) => (
              <option key={z} value={z}>
                {z}×
              </option>
            ))}
          </select>
        </label>
        <a href={frameHref} download className={buttonClass("quiet", "sm")}>
          Download this frame (PNG)
        </a>
      </div>

      <fieldset className="flex flex-wrap items-center gap-x-4 gap-y-1.5">
        <legend className="sr-only">Overlays</legend>
        <span className="text-xs text-ink-300" aria-hidden="true">
          Show
        </span>
        {OVERLAY_LABELS.map(([name, label]) => (
          <label key={name} className="inline-flex items-center gap-1.5 text-xs text-ink-200">
            <input
              type="checkbox"
              checked={overlays[name]}
              onChange={(e) => onOverlay(name, e.target.checked)}
              className="h-3.5 w-3.5 accent-glass-400"
            />
            {label}
          </label>
        ))}
      </fieldset>
    </div>
  );
}
