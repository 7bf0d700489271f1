/**
 * The frame preview: a canvas whose drawing buffer is exactly (width × zoom) × (height × zoom) pixels, the frame from
 * the worker and the overlays on it. With the pointer (or the arrow keys and Enter) it places the pivot on the
 * half-pixel grid or marks key pixels on the source.
 */
import { useEffect, useRef, useState, type KeyboardEvent, type PointerEvent } from "react";
import { drawFrame, PixelStage, pivotKind, type Overlays } from "../../bench/draw.ts";
import type { FrameAnswer } from "../../bench/useBenchWorker.ts";
import type { PointerMode } from "./SettingsForm.tsx";

type Hover = { kind: "pivot" | "pixel"; x: number; y: number } | null;

export function describeSpot(kind: "pivot" | "pixel", x: number, y: number): string {
  if (kind === "pixel") return `pixel (${x}, ${y})`;
  const k = pivotKind({ x, y });
  return k === "centre"
    ? `(${x}, ${y}), the centre of pixel (${Math.floor(x)}, ${Math.floor(y)})`
    : k === "corner"
      ? `(${x}, ${y}), a corner between four pixels`
      : `(${x}, ${y}), the middle of a pixel edge`;
}

export function PreviewCanvas({
  answer,
  width,
  height,
  zoom,
  pivot,
  outline,
  overlays,
  mode,
  description,
  onPlacePivot,
  onToggleKey,
  onKey,
}: {
  answer: FrameAnswer | null;
  width: number;
  height: number;
  zoom: number;
  pivot: { x: number; y: number };
  outline: Float32Array | null;
  overlays: Overlays;
  mode: PointerMode;
  description: string;
  onPlacePivot: (x: number, y: number) => void;
  onToggleKey: (x: number, y: number) => void;
  /** Keys the canvas does not use itself in this mode (frame stepping and so on). */
  onKey: (event: KeyboardEvent<HTMLCanvasElement>) => void;
}) {
  const canvas = useRef<HTMLCanvasElement>(null);
  const stage = useRef<PixelStage | null>(null);
  // The pointer's spot and the keyboard's cursor belong to the mode they were made in; another mode forgets them.
  const [spotIn, setSpotIn] = useState<{ mode: PointerMode; hover: Hover; cursor: { x: number; y: number } | null }>({
    mode,
    hover: null,
    cursor: null,
  });
  const hover = spotIn.mode === mode ? spotIn.hover : null;
  const cursor = spotIn.mode === mode ? spotIn.cursor : null;
  const setHover = (h: Hover) => setSpotIn((s) => ({ mode, hover: h, cursor: s.mode === mode ? s.cursor : null }));
  const setCursor = (c: { x: number; y: number } | null) =>
    setSpotIn((s) => ({ mode, hover: s.mode === mode ? s.hover : null, cursor: c }));

  useEffect(() => {
    const c = canvas.current;
    if (!c || !answer) return;
    if (answer.picture.rgba.length !== width * height * 4) return;
    const ctx = c.getContext("2d");
    if (!ctx) return;
    stage.current ??= new PixelStage();
    drawFrame(ctx, stage.current, {
      picture: answer.picture,
      display: answer.display,
      width,
      height,
      zoom,
      degrees: answer.degrees,
      pivot,
      outline,
      overlays,
      hover,
    });
  }, [answer, width, height, zoom, pivot, outline, overlays, hover]);

  const spot = (event: PointerEvent<HTMLCanvasElement>): Hover => {
    const rect = event.currentTarget.getBoundingClientRect();
    const x = ((event.clientX - rect.left) / rect.width) * width;
    const y = ((event.clientY - rect.top) / rect.height) * height;
    if (mode === "pivot")
      return {
        kind: "pivot",
        x: Math.min(width, Math.max(0, Math.round(x * 2) / 2)),
        y: Math.min(height, Math.max(0, Math.round(y * 2) / 2)),
      };
    if (mode === "keys")
      return { kind: "pixel", x: Math.min(width - 1, Math.max(0, Math.floor(x))), y: Math.min(height - 1, Math.max(0, Math.floor(y))) };
    return null;
  };

  const act = (h: Hover) => {
    if (!h) return;
    if (h.kind === "pivot") onPlacePivot(h.x, h.y);
    else onToggleKey(h.x, h.y);
  };

  const keyDown = (event: KeyboardEvent<HTMLCanvasElement>) => {
    if (mode === "view") return onKey(event);
    const step = mode === "pivot" ? 0.5 : 1;
    const start = cursor ?? (mode === "pivot" ? pivot : { x: Math.floor(width / 2), y: Math.floor(height / 2) });
    const move: Record<string, [number, number]> = {
      ArrowLeft: [-step, 0],
      ArrowRight: [step, 0],
      ArrowUp: [0, -step],
      ArrowDown: [0, step],
    };
    if (move[event.key]) {
      event.preventDefault();
      const maxX = mode === "pivot" ? width : width - 1;
      const maxY = mode === "pivot" ? height : height - 1;
      const next = {
        x: Math.min(maxX, Math.max(0, start.x + move[event.key][0])),
        y: Math.min(maxY, Math.max(0, start.y + move[event.key][1])),
      };
      setCursor(next);
      setHover({ kind: mode === "pivot" ? "pivot" : "pixel", ...next });
    } else if (event.key === "Enter" || event.key === " ") {
      event.preventDefault();
      act({ kind: mode === "pivot" ? "pivot" : "pixel", ...start });
    } else onKey(event);
  };

  const hint =
    mode === "pivot"
      ? "Click to place the pivot, or move with the arrow keys and press Enter. It snaps to pixel centres, corners and edge middles."
      : mode === "keys"
        ? "Click a pixel of the source to mark it as key, again to unmark it; or move with the arrow keys and press Enter."
        : "Arrow keys: ← → frames, ↑ ↓ passes; + and − zoom; space plays or pauses.";

  return (
    <div className="flex flex-col items-start gap-2" style={{ maxWidth: Math.max(320, width * zoom + 2) }}>
      <div
        className="max-w-full overflow-auto rounded-sm border border-ink-600 bg-[repeating-conic-gradient(#1d252d_0_25%,#12181e_0_50%)] bg-[length:16px_16px]"
        style={{ maxHeight: "70vh" }}
      >
        <canvas
          ref={canvas}
          width={width * zoom}
          height={height * zoom}
          role="img"
          aria-label="Frame preview"
          aria-describedby="frame-preview-description frame-preview-hint"
          tabIndex={0}
          data-testid="frame-preview"
          className={`block pixelated ${mode === "view" ? "" : "cursor-crosshair"}`}
          style={{ width: width * zoom, height: height * zoom }}
          onPointerMove={(e) => mode !== "view" && setHover(spot(e))}
          onPointerLeave={() => setHover(null)}
          onClick={(e) => act(spot(e as unknown as PointerEvent<HTMLCanvasElement>))}
          onKeyDown={keyDown}
        />
      </div>
      <p id="frame-preview-description" className="num text-xs text-ink-300" aria-live="polite">
        {description}
        {hover ? ` · ${mode === "pivot" ? "pivot at" : "key"} ${describeSpot(hover.kind, hover.x, hover.y)}` : ""}
      </p>
      <p id="frame-preview-hint" className="text-xs text-ink-400">
        {hint}
      </p>
    </div>
  );
}
