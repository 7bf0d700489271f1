import { compileShifts, withDiagnostics } from "../compileTables.ts";
import { beginDiagnoseTrack } from "../diagnostics/diagnoseTrack.ts";
import type { Effect } from "../effect.ts";
import { armDialect } from "./arm.ts";
import { assemblyLines } from "./asm.ts";
import { binaryExport } from "./binary.ts";
import { budgetFromTables, type BudgetReport } from "./budget.ts";
import { cHeader, cSourceLines } from "./c.ts";
import { ca65Dialect } from "./ca65.ts";
import { alwaysFiles, outputFiles } from "./files.ts";
import { effectFileName } from "./header.ts";
import { FRAMES_PER_PIECE, tablesDocumentPieces } from "./json.ts";
import { tableListTexts } from "../tablesDocument.ts";
import { layoutFromTables, type ExportLayout } from "./layout.ts";
import { m68kDialect } from "./m68k.ts";
import { resolveExportOptions, type ExportOptions, type ExportOptionsInput, type ExportOutput } from "./options.ts";
import { readmeText } from "./readme.ts";
import { runtimeSource } from "./runtime.ts";
import { z80Dialect } from "./z80.ts";
import { zipArchive, zipArchiveAsync, zipWriter, type TextPieces, type ZipSource, type ZipWriter } from "./zip.ts";

/** One file of an export bundle: its name, its text (null for the binaries) and its bytes. */
export interface BundleFile {
  readonly name: string;
  readonly text: string | null;
  readonly bytes: Uint8Array;
}

/** Everything an export makes: the files, the zip holding them, the budget and the resolved options. */
export interface ExportBundle {
  readonly label: string;
  readonly options: ExportOptions;
  readonly files: readonly BundleFile[];
  /**
   * A zip of every file (deflate level 1, see export/zip.ts), with a fixed date so the same effect and options give the
   * same bytes; made when first read, so a caller that only writes the files never pays for it.
   */
  readonly zip: Uint8Array;
  /** The same bytes as `zip`, with Node's zlib deflating on its thread pool meanwhile where there is one. */
  zipAsync(): Promise<Uint8Array>;
  readonly budget: BudgetReport;
}

/** Most table bytes a bundle may hold: 32 MiB, the largest cartridge ROM among the targets (a GBA cartridge; from memory). */
export const EXPORT_MAX_BYTES = 32 * 1024 * 1024;

/** Date stamped on every zip entry: the first day a zip (DOS) date can hold, so bundles are reproducible. */
const ZIP_DATE = new Date(1980, 0, 1, 0, 0, 0);

/** How far exportBundle has got: steps done of the total, and what the step made (the tables, or one output). */
export type BundleProgress = (done: number, total: number, step: string) => void;

/** The pieces of each text file made by outputTexts, for the zip (a file's own fields join and encode them when read). */
const filePieces = new WeakMap<BundleFile, TextPieces>();

/**
 * A text file whose text is joined from `pieces` and whose bytes are encoded when first read: a zip encodes the pieces
 * itself, so an export that only writes the zip never builds either (tens of megabytes for a long track).
 */
function piecesFile(name: string, pieces: readonly string[], separator: string): BundleFile {
  let text: string | undefined;
  let bytes: Uint8Array | undefined;
  const file: BundleFile = {
    name,
    get text() {
      return (text ??= pieces.join(separator));
    },
    get bytes() {
      return (bytes ??= new TextEncoder().encode(file.text!));
    },
  };
  filePieces.set(file, { pieces, separator });
  return file;
}

/** A file as the zip reads it: a text file of outputTexts by its pieces, every other by its bytes. */
function zipSource(f: BundleFile): ZipSource {
  const pieces = filePieces.get(f);
  return pieces
    ? {
        name: f.name,
        pieces,
        get bytes() {
          return f.bytes;
        },
      }
    : f;
}

/**
 * The files of one output for a layout, in bundle order; `json` gives the tables document as pieces
 * (tablesDocumentPieces).
 */
export function outputFilesOf(layout: ExportLayout, output: ExportOutput, json: () => readonly string[]): BundleFile[] {
  const n = outputFiles(layout.label)[output];
  const text = (name: string, t: string): BundleFile => piecesFile(name, [t], "");
  const lines = (name: string, l: readonly string[]): BundleFile => piecesFile(name, l, "\n");
  const raw = (name: string, bytes: Uint8Array): BundleFile => ({ name, text: null, bytes });
  switch (output) {
    case "c":
      return [text(n[0], cHeader(layout)), lines(n[1], cSourceLines(layout))];
    case "6502":
      return [lines(n[0], assemblyLines(layout, ca65Dialect))];
    case "68k":
      return [lines(n[0], assemblyLines(layout, m68kDialect))];
    case "arm":
      return [lines(n[0], assemblyLines(layout, armDialect))];
    case "z80":
      return [lines(n[0], assemblyLines(layout, z80Dialect))];
    case "bin":
      return [raw(n[0], binaryExport(layout, "little")), raw(n[1], binaryExport(layout, "big"))];
    case "json":
      return [piecesFile(n[0], [...json(), "\n"], "")];
    case "runtime":
      return [text(n[0], runtimeSource(layout))];
  }
}

/**
 * Makes the export bundle of a validated effect: README.txt, the chosen outputs (C, four assembler dialects, raw
 * binaries, tables document, run-time routine) and the effect document, as files and as one zip. `options.name` is the
 * effect's name (default label and headers). Throws ExportOptionError for a bad or inapplicable option, RangeError when
 * the tables exceed EXPORT_MAX_BYTES. `onProgress` hears of every step (the tables, then each output), so a long export
 * can show how far it has got.
 */
export function exportBundle(effect: Effect, options: ExportOptionsInput = {}, onProgress?: BundleProgress): ExportBundle {
  const steps = bundleSteps(effect, options, onProgress, null);
  const last = steps.next();
  if (!last.done) throw new Error("exportBundle: a bundle made without a zip writer waited for one");
  return last.value;
}

/**
 * exportBundle for a caller that will write the zip (the command line): each file goes to be deflated (zipWriter) as
 * soon as it is made, on Node's thread pool while this thread makes the next and a long track's diagnostics run, and
 * `zipAsync` gives that archive. The same files and zip bytes as exportBundle, sooner.
 */
export async function exportBundleZipping(
  effect: Effect,
  options: ExportOptionsInput = {},
  onProgress?: BundleProgress,
): Promise<ExportBundle> {
  const steps = bundleSteps(effect, options, onProgress, zipWriter(ZIP_DATE));
  try {
    for (let step = steps.next(); ; step = steps.next(await step.value)) if (step.done) return step.value;
  } catch (error) {
    steps.return(undefined as never);
    throw error;
  }
}

/**
 * The work of exportBundle, as a generator that yields a promise wherever `writer` asks to wait for a buffer (never
 * without a writer) and returns the bundle.
 */
function* bundleSteps(
  effect: Effect,
  options: ExportOptionsInput,
  onProgress: BundleProgress | undefined,
  writer: ZipWriter | null,
): Generator<Promise<void>, ExportBundle, void> {
  const resolved = resolveExportOptions(options);
  const total = resolved.outputs.length + 1;
  let done = 0;
  const step = (name: string) => onProgress?.(++done, total, name);
  const tables = compileShifts(effect);
  step("tables");
  const budget = budgetFromTables(tables, resolved);
  if (budget.totalBytes > EXPORT_MAX_BYTES)
    throw new RangeError(
      `export: ${budget.totalBytes} bytes of tables is more than the ${EXPORT_MAX_BYTES} a bundle may hold (32 MiB, the largest cartridge ROM of the targets); use dedupe or half tables, fewer frames or a smaller canvas`,
    );
  // Only the tables document carries diagnostics. A large track's are measured on worker threads while this thread
  // writes the other outputs, and collected when the document is written (outputs come in EXPORT_OUTPUTS order, the
  // document after every table file).
  const diagnostics = resolved.outputs.includes("json") ? beginDiagnoseTrack(effect, tables.frames) : null;
  const json = () => {
    const lists = tableListTexts(tables.frames, true);
    return tablesDocumentPieces(withDiagnostics(tables, diagnostics!.finish()), true, FRAMES_PER_PIECE, lists);
  };
  let zipIndex = 1; // README.txt is the zip's first file; it is made last, once every name is known
  let layout: ExportLayout;
  const outputs: BundleFile[] = [];
  try {
    layout = layoutFromTables(tables, resolved);
    for (const output of resolved.outputs) {
      const made = outputFilesOf(layout, output, json);
      outputs.push(...made);
      step(output);
      for (const f of made) {
        const wait = writer?.add(zipIndex++, zipSource(f));
        if (wait) yield wait;
      }
    }
  } finally {
    diagnostics?.cancel();
  }
  const enc = new TextEncoder();
  const [readmeName, effectName] = alwaysFiles(layout.label);
  const effectText = `${JSON.stringify(effect, null, 2)}\n`;
  const names = [readmeName, ...outputs.map((f) => f.name), effectName];
  const readme = readmeText(layout, names, budget);
  const files: BundleFile[] = [
    { name: readmeName, text: readme, bytes: enc.encode(readme) },
    ...outputs,
    { name: effectFileName(layout.label), text: effectText, bytes: enc.encode(effectText) },
  ];
  if (writer) {
    // Files given by their bytes never wait.
    void writer.add(0, files[0]);
    void writer.add(zipIndex, files[files.length - 1]);
  }
  let zip: Uint8Array | undefined;
  return {
    label: layout.label,
    options: resolved,
    files,
    get zip() {
      return (zip ??= zipArchive(files.map(zipSource), ZIP_DATE));
    },
    async zipAsync() {
      return (zip ??= await (writer ? writer.finish() : zipArchiveAsync(files.map(zipSource), ZIP_DATE)));
    },
    budget,
  };
}
