/**
 * The summary above the table: the worst frame and why, which frames wrap, clip or saturate and why, and core's
 * canvas-fit advice with one click to grow the canvas (moving the pivot and the sprite with it).
 */
import type { CanvasFit, Effect } from "@skewsmith/core";
import type { FrameRow } from "../../bench/trackDiagnosis.ts";
import { growToFit } from "../../bench/fit.ts";
import { qNotation } from "../../effects/display.ts";
import { buttonClass } from "../ui.tsx";
import { short } from "./FrameTable.tsx";

function listFrames(frames: number[]): string {
  if (frames.length <= 6) return frames.join(", ");
  return `${frames.slice(0, 5).join(", ")} and ${frames.length - 5} more`;
}

/** Why a frame's error is what it is, in the trade's words: the causes that apply to it. */
export function errorCauses(row: FrameRow, effect: Effect, reach: number): string[] {
  const F = effect.fixedPoint.fraction;
  const scale = 2 ** F;
  const t = (row.residualDegrees * Math.PI) / 180;
  const causes: string[] = [];
  if (row.saturated) causes.push(`kα or kβ does not fit ${qNotation(effect.fixedPoint)} and was clamped, so the shear is too small`);
  const betaError = Math.abs(row.beta / scale - Math.sin(t)) * reach;
  const alphaError = Math.abs(row.alpha / scale + Math.tan(t / 2)) * reach;
  const coefficient = Math.max(alphaError, betaError);
  if (coefficient >= 0.25)
    causes.push(
      `${qNotation(effect.fixedPoint)} rounds the coefficients: ${reach.toFixed(0)} px from the pivot that alone moves a pixel about ${coefficient.toFixed(2)} px (more fraction bits help)`,
    );
  if (effect.columnGroup > 1)
    causes.push(
      `columns move in groups of ${effect.columnGroup}, so a column up to ${(effect.columnGroup - 1) / 2} px from its group's centre takes the centre's shift (off by up to ${(((effect.columnGroup - 1) / 2) * Math.abs(Math.sin(t))).toFixed(2)} px at ${short(row.residualDegrees, 2)}°)`,
    );
  if (row.flip) causes.push(`it turns by a half-turn flip and then only ${short(row.residualDegrees, 3)}° with shears`);
  causes.push("each of the three passes moves whole pixels, so each can leave a pixel up to half a pixel off (the method's own rounding)");
  return causes;
}

export function BenchSummary({
  rows,
  total,
  effect,
  fit,
  align,
  onAlign,
  onGrow,
  canEdit,
  followedProfile,
  masked,
  onJump,
}: {
  rows: FrameRow[];
  total: number;
  effect: Effect;
  fit: CanvasFit | null;
  align: number;
  onAlign: (align: number) => void;
  onGrow: (fit: CanvasFit) => void;
  canEdit: boolean;
  followedProfile: string | null;
  masked: boolean;
  onJump: (frame: number) => void;
}) {
  if (rows.length === 0) return <p className="text-sm text-ink-400">Measuring the frames…</p>;
  const worst = rows.reduce((w, r) => (r.maxErrorPx > w.maxErrorPx ? r : w), rows[0]);
  const wrapped = rows.filter((r) => r.wrapped > 0);
  const clipped = rows.filter((r) => r.clipped > 0);
  const saturated = rows.filter((r) => r.saturated);
  const worstWrap = wrapped.reduce<FrameRow | null>((w, r) => (!w || r.wrapped > w.wrapped ? r : w), null);
  const worstClip = clipped.reduce<FrameRow | null>((w, r) => (!w || r.clipped > w.clipped ? r : w), null);
  const { width: W, height: H } = effect.canvas;
  const growth = fit ? growToFit(effect, fit, align) : null;
  const reach = Math.hypot(Math.max(effect.pivot.x, W - effect.pivot.x), Math.max(effect.pivot.y, H - effect.pivot.y));
  const pixels = masked ? "of the sprite's pixels" : "pixels";
  const frameLink = (r: FrameRow) => (
    <button type="button" className="num cursor-pointer text-glass-300 underline-offset-2 hover:underline" onClick={() => onJump(r.index)}>
      frame {r.index}
    </button>
  );
  return (
    <div className="flex flex-col gap-3 text-sm" data-testid="bench-summary">
      {rows.length === total ? (
        <div>
          <p className="text-ink-100">
            Worst error: {frameLink(worst)} ({short(worst.written, 3)}°), <span className="num">{worst.maxErrorPx.toFixed(3)} px</span> at
            most, <span className="num">{worst.meanErrorPx.toFixed(3)} px</span> on average.
          </p>
          <p className="mt-0.5 text-xs text-ink-400">Why: {errorCauses(worst, effect, reach).join("; ")}.</p>
        </div>
      ) : null}

      {wrapped.length > 0 && worstWrap ? (
        <div className="rounded-md border border-alert-400/40 bg-alert-900/40 px-3 py-2" data-testid="wrap-warning" role="status">
          <p className="font-medium text-alert-300">
            {wrapped.length} of {total} frames wrap {pixels}: the worst is {frameLink(worstWrap)} with{" "}
            <span className="num">{worstWrap.wrapped}</span>.
          </p>
          <p className="mt-0.5 text-xs text-ink-200">
            Why: the turned {masked ? "sprite" : "picture"} reaches past the canvas edge, and with edges set to wrap a pixel that leaves one
            edge comes back at the opposite one, as on a hardware scroll plane. On the target those pixels show up on the wrong side.
            {masked ? " Transparent pixels that wrap harm nothing and are not counted." : ""}
          </p>
        </div>
      ) : null}
      {clipped.length > 0 && worstClip ? (
        <div className="rounded-md border border-alert-400/40 bg-alert-900/40 px-3 py-2" data-testid="clip-warning" role="status">
          <p className="font-medium text-alert-300">
            {clipped.length} of {total} frames lose {pixels} at the edge: the worst is {frameLink(worstClip)} with{" "}
            <span className="num">{worstClip.clipped}</span> dropped.
          </p>
          <p className="mt-0.5 text-xs text-ink-200">
            Why: the turned picture reaches past the canvas edge, and with edges set to clip those pixels are dropped.
          </p>
        </div>
      ) : null}
      {wrapped.length === 0 && clipped.length === 0 && rows.length === total ? (
        <p className="text-glass-300" data-testid="fits-note">
          No frame wraps or clips {pixels}: every one stays on the canvas through all three passes.
        </p>
      ) : null}
      {saturated.length > 0 ? (
        <p className="text-alert-300" data-testid="saturation-warning">
          Saturated coefficients on frames {listFrames(saturated.map((r) => r.index))}: {qNotation(effect.fixedPoint)} holds values from −
          {2 ** (effect.fixedPoint.bits - 1 - effect.fixedPoint.fraction)} up to just under{" "}
          {2 ** (effect.fixedPoint.bits - 1 - effect.fixedPoint.fraction)}, so a larger coefficient (sin 90° = 1 in Q1.7, say) is clamped.
          Use fewer fraction bits or more bits.
        </p>
      ) : null}

      {fit && growth ? (
        <div className="rounded-md border border-ink-700 bg-ink-950/60 px-3 py-2" data-testid="canvas-fit">
          {fit.fitsNow ? (
            <p className="text-ink-200">
              Canvas fit: every frame fits this {W} × {H} canvas; the smallest that would is{" "}
              <span className="num">
                {fit.width} × {fit.height}
              </span>
              .
            </p>
          ) : (
            <p className="text-ink-100">
              Canvas fit: growing the canvas to{" "}
              <span className="num" data-testid="fit-size">
                {growth.width} × {growth.height}
              </span>{" "}
              (left {growth.left}, right {growth.right}, top {growth.top}, bottom {growth.bottom} px) holds every frame; the pivot moves to
              ({growth.pivot.x}, {growth.pivot.y}) and the sprite with it. The smallest canvas that would do is {fit.width} × {fit.height}.
              {fit.worstFrame >= 0 ? ` Frame ${fit.worstFrame} reaches furthest out.` : ""}
              {fit.withinLimits ? "" : " That is more than the 4096 pixels a side the core allows: turn less, or move the pivot."}
            </p>
          )}
          <div className="mt-2 flex flex-wrap items-center gap-3">
            <label className="flex items-center gap-1.5 text-xs text-ink-300">
              Round the size up to
              <select
                value={align}
                onChange={(e) => onAlign(Number(e.target.value))}
                className="rounded border border-ink-600 bg-ink-900 px-1.5 py-1 text-xs text-ink-100"
              >
                {[1, 2, 4, 8, 16].map((a) => (
                  <option key={a} value={a}>
                    {a === 1 ? "any size" : `multiples of ${a} px`}
                  </option>
                ))}
              </select>
            </label>
            {canEdit && !fit.fitsNow && growth.width <= 4096 && growth.height <= 4096 ? (
              <button type="button" className={buttonClass("primary", "sm")} onClick={() => onGrow(fit)}>
                Grow the canvas to fit{followedProfile ? ` (detaches from ${followedProfile})` : ""}
              </button>
            ) : null}
          </div>
        </div>
      ) : rows.length === total ? (
        <p className="text-xs text-ink-400">Working out the canvas fit…</p>
      ) : null}
    </div>
  );
}
