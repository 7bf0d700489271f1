import { compileShifts, type CompiledTables, type FrameTables } from "../compileTables.ts";
import { beginDiagnoseTrack } from "../diagnostics/diagnoseTrack.ts";
import type { FrameDiagnostics } from "../frameDiagnostics.ts";
import type { Effect } from "../effect.ts";
import { armDialect } from "./arm.ts";
import { assemblyLines } from "./asm.ts";
import { binaryExport } from "./binary.ts";
import { budgetFromTables, type BudgetReport } from "./budget.ts";
import { cHeader, cSourceLines } from "./c.ts";
import { ca65Dialect } from "./ca65.ts";
import { alwaysFiles, outputFiles } from "./files.ts";
import { effectFileName } from "./header.ts";
import { tablesDocumentPieces } from "./json.ts";
import { layoutFromTables, type ExportLayout } from "./layout.ts";
import { m68kDialect } from "./m68k.ts";
import { resolveExportOptions, type ExportOptions, type ExportOptionsInput, type ExportOutput } from "./options.ts";
import { readmeText } from "./readme.ts";
import { runtimeSource } from "./runtime.ts";
import { z80Dialect } from "./z80.ts";
import { zipArchive, zipArchiveAsync, type TextPieces, type ZipSource } from "./zip.ts";

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

/** The files as the zip reads them: a text file of outputTexts by its pieces, every other by its bytes. */
function zipSources(files: readonly BundleFile[]): ZipSource[] {
  return files.map((f) => {
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
  });
}

/** The text of every output file for a layout, by file name, in bundle order (README and effect document excepted); `json` gives the tables document as pieces (tablesDocumentPieces). */
export function outputTexts(layout: ExportLayout, json: () => readonly string[], onOutput?: (output: ExportOutput) => void): BundleFile[] {
  const names = outputFiles(layout.label);
  const text = (name: string, t: string): BundleFile => piecesFile(name, [t], "");
  const lines = (name: string, l: readonly string[]): BundleFile => piecesFile(name, l, "\n");
  const raw = (name: string, bytes: Uint8Array): BundleFile => ({ name, text: null, bytes });
  const files: BundleFile[] = [];
  for (const output of layout.options.outputs) {
    const n = names[output];
    switch (output) {
      case "c":
        files.push(text(n[0], cHeader(layout)), lines(n[1], cSourceLines(layout)));
        break;
      case "6502":
        files.push(lines(n[0], assemblyLines(layout, ca65Dialect)));
        break;
      case "68k":
        files.push(lines(n[0], assemblyLines(layout, m68kDialect)));
        break;
      case "arm":
        files.push(lines(n[0], assemblyLines(layout, armDialect)));
        break;
      case "z80":
        files.push(lines(n[0], assemblyLines(layout, z80Dialect)));
        break;
      case "bin":
        files.push(raw(n[0], binaryExport(layout, "little")), raw(n[1], binaryExport(layout, "big")));
        break;
      case "json":
        files.push(piecesFile(n[0], [...json(), "\n"], ""));
        break;
      case "runtime":
        files.push(text(n[0], runtimeSource(layout)));
        break;
    }
    onOutput?.(output);
  }
  return files;
}

/** Compiled tables with each frame's diagnostics added: what compileTables returns. */
function withDiagnostics(tables: CompiledTables<FrameTables>, diagnostics: readonly FrameDiagnostics[]): CompiledTables {
  return { effect: tables.effect, elementType: tables.elementType, frames: tables.frames.map((f, i) => ({ ...f, ...diagnostics[i] })) };
}

/**
 * Makes the export bundle of a validated effect: README.txt, the chosen outputs (C, four assembler dialects, raw
 * binaries, tables document, run-time routine) and the effect document, as files and as one zip. `options.name` is the
 * effect's name (default label and headers). Throws ExportOptionError for a bad or inapplicable option, RangeError when
 * the tables exceed EXPORT_MAX_BYTES. `onProgress` hears of every step (the tables, then each output), so a long export
 * can show how far it has got.
 */
export function exportBundle(effect: Effect, options: ExportOptionsInput = {}, onProgress?: BundleProgress): ExportBundle {
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
  let layout: ExportLayout;
  let outputs: BundleFile[];
  try {
    layout = layoutFromTables(tables, resolved);
    outputs = outputTexts(
      layout,
      () => tablesDocumentPieces(withDiagnostics(tables, diagnostics!.finish()), true),
      (output) => step(output),
    );
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
  let zip: Uint8Array | undefined;
  return {
    label: layout.label,
    options: resolved,
    files,
    get zip() {
      return (zip ??= zipArchive(zipSources(files), ZIP_DATE));
    },
    async zipAsync() {
      return (zip ??= await zipArchiveAsync(zipSources(files), ZIP_DATE));
    },
    budget,
  };
}
