/**
 * Drawing one frame on the preview canvas: the frame's pixels at an integer zoom (no smoothing), then the overlays the
 * person turned on. Pure canvas 2D code, shared by the preview and the browser benchmark (bench/).
 */
import { errorShading, type FrameDisplay } from "./display.ts";
import type { FramePicture } from "./framePainter.ts";

export { ERROR_BANDS } from "./display.ts";

export interface Overlays {
  grid: boolean;
  ideal: boolean;
  error: boolean;
  marks: boolean;
  pivot: boolean;
  edge: boolean;
  keys: boolean;
}

export const NO_OVERLAYS: Overlays = { grid: false, ideal: false, error: false, marks: false, pivot: false, edge: false, keys: false };

/** Colours of the marks, chosen to stand apart from the error bands and from the app's own colours. */
export const MARK_COLOURS = {
  ideal: "#ff7ad9",
  wrapped: "rgba(255, 122, 217, 0.55)",
  lost: "#ff7ad9",
  pivot: "#f5f7f9",
  key: "#7cf0ff",
  grid: "rgba(255, 255, 255, 0.13)",
  edge: "#f2c48d",
  hover: "#f2c48d",
} as const;

export interface DrawInput {
  picture: FramePicture;
  width: number;
  height: number;
  zoom: number;
  /** θn of the frame, for the ideal outline. */
  degrees: number;
  pivot: { x: number; y: number };
  /** The counted pixels' outline, [x0, y0, x1, y1, …] in canvas pixels (see outline in source.ts). */
  outline: Float32Array | null;
  overlays: Overlays;
  /** The frame's pixels already zoomed (and shaded) by the worker; drawn with one putImageData when it matches. */
  display?: FrameDisplay | null;
  /** Where the pointer would place something: a pivot spot (half-pixel steps) or a pixel, in canvas pixels. */
  hover?: { kind: "pivot" | "pixel"; x: number; y: number } | null;
}

/** A 1× canvas holding the frame's pixels, kept between draws to spare allocations. */
export class PixelStage {
  private canvas: HTMLCanvasElement | OffscreenCanvas | null = null;
  private ctx: CanvasRenderingContext2D | OffscreenCanvasRenderingContext2D | null = null;

  /** The pixels of `rgba` (width × height RGBA) on the stage, ready to be drawn scaled. */
  put(rgba: Uint8ClampedArray<ArrayBuffer>, width: number, height: number): HTMLCanvasElement | OffscreenCanvas {
    if (!this.canvas || this.canvas.width !== width || this.canvas.height !== height) {
      this.canvas =
        typeof OffscreenCanvas !== "undefined"
          ? new OffscreenCanvas(width, height)
          : Object.assign(document.createElement("canvas"), { width, height });
      this.ctx = this.canvas.getContext("2d") as CanvasRenderingContext2D | OffscreenCanvasRenderingContext2D;
    }
    this.ctx!.putImageData(new ImageData(rgba, width, height), 0, 0);
    return this.canvas;
  }
}

/** Draws a frame and its overlays on `ctx`, whose canvas is exactly (width × zoom) × (height × zoom) pixels. */
export function drawFrame(ctx: CanvasRenderingContext2D, stage: PixelStage, input: DrawInput): void {
  const { picture, width: W, height: H, zoom: z, overlays } = input;
  const cw = W * z;
  const ch = H * z;
  const shade = overlays.error && picture.error !== null;
  const display = input.display;
  if (display && display.zoom === z && display.shaded === shade && display.pixels.length === cw * ch * 4) {
    // The whole canvas at once, transparent background included: nothing to clear or scale.
    ctx.putImageData(new ImageData(display.pixels, cw, ch), 0, 0);
  } else {
    ctx.clearRect(0, 0, cw, ch);
    ctx.imageSmoothingEnabled = false;
    ctx.drawImage(stage.put(shade ? errorShading(picture) : picture.rgba, W, H), 0, 0, cw, ch);
  }

  if (overlays.grid && z >= 4) {
    ctx.strokeStyle = MARK_COLOURS.grid;
    ctx.lineWidth = 1;
    ctx.beginPath();
    for (let x = 1; x < W; x++) {
      ctx.moveTo(x * z + 0.5, 0);
      ctx.lineTo(x * z + 0.5, ch);
    }
    for (let y = 1; y < H; y++) {
      ctx.moveTo(0, y * z + 0.5);
      ctx.lineTo(cw, y * z + 0.5);
    }
    ctx.stroke();
  }

  if (overlays.marks) {
    if (picture.wrapped) {
      ctx.fillStyle = MARK_COLOURS.wrapped;
      ctx.strokeStyle = MARK_COLOURS.ideal;
      ctx.lineWidth = 1;
      ctx.beginPath();
      for (let i = 0; i < picture.wrapped.length; i++) {
        if (!picture.wrapped[i]) continue;
        const x = (i % W) * z;
        const y = Math.floor(i / W) * z;
        ctx.fillRect(x, y, z, z);
        if (z >= 3) {
          ctx.moveTo(x, y + z);
          ctx.lineTo(x + z, y);
        }
      }
      ctx.stroke();
    }
    if (picture.lost) {
      ctx.strokeStyle = MARK_COLOURS.lost;
      ctx.lineWidth = Math.max(1, z / 4);
      ctx.beginPath();
      const r = Math.max(1.5, z * 0.35);
      for (let i = 0; i < picture.lost.length; i += 2) {
        // A cross where the ideal turn would put the lost pixel; at the edge when that is outside the canvas.
        const x = Math.min(W - 0.5, Math.max(0.5, picture.lost[i])) * z;
        const y = Math.min(H - 0.5, Math.max(0.5, picture.lost[i + 1])) * z;
        ctx.moveTo(x - r, y - r);
        ctx.lineTo(x + r, y + r);
        ctx.moveTo(x - r, y + r);
        ctx.lineTo(x + r, y - r);
      }
      ctx.stroke();
    }
  }

  if (overlays.ideal && input.outline) {
    const t = (input.degrees * Math.PI) / 180;
    const cos = Math.cos(t);
    const sin = Math.sin(t);
    const { x: px, y: py } = input.pivot;
    const turn = (x: number, y: number): [number, number] => [
      (px + (x - px) * cos - (y - py) * sin) * z,
      (py + (x - px) * sin + (y - py) * cos) * z,
    ];
    ctx.strokeStyle = MARK_COLOURS.ideal;
    ctx.lineWidth = Math.max(1, Math.min(2, z / 3));
    ctx.beginPath();
    const o = input.outline;
    for (let i = 0; i < o.length; i += 4) {
      const [x0, y0] = turn(o[i], o[i + 1]);
      const [x1, y1] = turn(o[i + 2], o[i + 3]);
      ctx.moveTo(x0, y0);
      ctx.lineTo(x1, y1);
    }
    ctx.stroke();
  }

  if (overlays.keys && picture.keys) {
    ctx.strokeStyle = MARK_COLOURS.key;
    ctx.lineWidth = Math.max(1.5, z / 5);
    for (let i = 0; i < picture.keys.length; i += 2) {
      const x = picture.keys[i];
      const y = picture.keys[i + 1];
      if (Number.isNaN(x)) continue;
      ctx.strokeRect(x * z + 0.5, y * z + 0.5, z - 1, z - 1);
    }
  }

  if (overlays.edge) {
    ctx.strokeStyle = MARK_COLOURS.edge;
    ctx.lineWidth = 2;
    ctx.setLineDash([6, 4]);
    ctx.strokeRect(1, 1, cw - 2, ch - 2);
    ctx.setLineDash([]);
  }

  if (overlays.pivot) drawPivot(ctx, input.pivot.x * z, input.pivot.y * z, pivotKind(input.pivot), MARK_COLOURS.pivot, z, true);

  const hover = input.hover;
  if (hover?.kind === "pivot") drawPivot(ctx, hover.x * z, hover.y * z, pivotKind(hover), MARK_COLOURS.hover, z, false);
  else if (hover?.kind === "pixel") {
    ctx.strokeStyle = MARK_COLOURS.hover;
    ctx.lineWidth = 2;
    ctx.strokeRect(hover.x * z + 1, hover.y * z + 1, z - 2, z - 2);
  }
}

/** Where a pivot sits on the half-pixel grid: a pixel's centre, a corner between four pixels, or the middle of an edge. */
export function pivotKind(p: { x: number; y: number }): "centre" | "corner" | "edge" {
  const fx = !Number.isInteger(p.x);
  const fy = !Number.isInteger(p.y);
  return fx && fy ? "centre" : !fx && !fy ? "corner" : "edge";
}

/** A pivot mark: a filled dot in a pixel's centre, a ring with a cross on a corner, a bar on an edge's middle. */
function drawPivot(
  ctx: CanvasRenderingContext2D,
  x: number,
  y: number,
  kind: "centre" | "corner" | "edge",
  colour: string,
  z: number,
  lines: boolean,
) {
  ctx.save();
  ctx.strokeStyle = colour;
  ctx.fillStyle = colour;
  ctx.lineWidth = 1.5;
  if (lines) {
    ctx.globalAlpha = 0.5;
    ctx.setLineDash([3, 3]);
    ctx.beginPath();
    ctx.moveTo(x, 0);
    ctx.lineTo(x, ctx.canvas.height);
    ctx.moveTo(0, y);
    ctx.lineTo(ctx.canvas.width, y);
    ctx.stroke();
    ctx.setLineDash([]);
    ctx.globalAlpha = 1;
  }
  const r = Math.max(3, Math.min(8, z * 0.4));
  ctx.beginPath();
  if (kind === "centre") {
    ctx.arc(x, y, r * 0.7, 0, Math.PI * 2);
    ctx.fill();
    ctx.strokeStyle = "#0c1014";
    ctx.lineWidth = 1;
    ctx.stroke();
  } else if (kind === "corner") {
    ctx.arc(x, y, r, 0, Math.PI * 2);
    ctx.moveTo(x - r * 1.6, y);
    ctx.lineTo(x + r * 1.6, y);
    ctx.moveTo(x, y - r * 1.6);
    ctx.lineTo(x, y + r * 1.6);
    ctx.stroke();
  } else {
    ctx.rect(x - r * 0.6, y - r * 0.6, r * 1.2, r * 1.2);
    ctx.stroke();
  }
  ctx.restore();
}
