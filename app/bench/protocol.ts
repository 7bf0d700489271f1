/** Messages between the bench page and its Web Worker (bench.worker.ts). Kept small: load, frame, budget, export. */
import type { BudgetReport, CanvasFit, Effect, ElementType, ExportOptionsInput } from "@skewsmith/core";
import type { FrameDisplay } from "./display.ts";
import type { KeyPixel } from "./draft.ts";
import type { ColourCount, FramePicture, FrameWants } from "./framePainter.ts";
import type { FrameRow } from "./trackDiagnosis.ts";
import type { Pass } from "./view.ts";

/** What the page asks of the worker. */
export type ToWorker =
  | {
      type: "load";
      generation: number;
      document: Effect;
      /** The sprite's PNG address (fetched and decoded once in the worker), or null. */
      sprite: { id: string; url: string } | null;
      spriteX: number | null;
      spriteY: number | null;
      keyPixels: KeyPixel[];
      /** Round the canvas-fit advice up to this many pixels. */
      align: number;
    }
  | {
      type: "frame";
      request: number;
      index: number;
      pass: Pass;
      wants: FrameWants;
      /** The preview's zoom, and whether to shade by error: the worker prepares the zoomed pixels (see display.ts). */
      zoom: number;
      shade: boolean;
    }
  /** Pixel buffers of frames the page no longer holds, handed back for the next frames (see display.ts). */
  | { type: "recycle"; buffers: ArrayBuffer[] }
  | { type: "budget"; job: number; document: Effect; options: ExportOptionsInput }
  | { type: "export"; job: number; document: Effect; options: ExportOptionsInput };

/** What the source and tables of a load look like, sent as soon as they are ready (before the diagnostics). */
export interface Loaded {
  frames: number;
  elementType: ElementType;
  /** The counted pixels' outline, [x0, y0, x1, y1, …] in canvas pixels. */
  outline: Float32Array<ArrayBuffer>;
  sourceColours: ColourCount[];
  /** Pixels the diagnostics count: the sprite's opaque ones, or the whole canvas. */
  content: number;
  sprite: { width: number; height: number; kind: "indexed" | "rgba"; placement: { x: number; y: number } } | null;
  /** Key pixels inside the canvas, in canvas pixels. */
  keys: [number, number][];
}

/** One file of the export bundle, as bytes (text files are UTF-8). */
export interface ExportFile {
  name: string;
  bytes: Uint8Array<ArrayBuffer>;
  text: boolean;
}

/** What the worker sends back. */
export type FromWorker =
  | ({ type: "loaded"; generation: number } & Loaded)
  | { type: "rows"; generation: number; rows: FrameRow[]; done: number; total: number }
  | { type: "diagnosed"; generation: number; ms: number }
  | { type: "fit"; generation: number; fit: CanvasFit }
  | {
      type: "frame";
      generation: number;
      request: number;
      index: number;
      pass: Pass;
      degrees: number;
      picture: FramePicture;
      display: FrameDisplay | null;
    }
  | { type: "budget"; job: number; report: BudgetReport | null; error: string | null }
  | { type: "export-progress"; job: number; done: number; total: number; step: string }
  | { type: "export"; job: number; files: ExportFile[] | null; error: string | null }
  | { type: "error"; generation: number; message: string };
