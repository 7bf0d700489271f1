import { mkdir } from "node:fs/promises";
import { basename, join } from "node:path";
import type { Effect } from "../effect.ts";
import { ExportOptionError } from "../export/exportOptionError.ts";
import { EXPORT_OUTPUTS, REGISTER_BITS, type ExportOptionsInput, type ExportOutput } from "../export/options.ts";
import { parseCommandArgs } from "./args.ts";
import { prepareDiagnostics, UsageError, type CliIo, type Command } from "./io.ts";

/** The parseArgs options `export` and `budget` share. */
export const exportArgOptions = {
  label: { type: "string" },
  outputs: { type: "string" },
  sign: { type: "string" },
  "register-bits": { type: "string" },
  element: { type: "string" },
  split: { type: "boolean" },
  half: { type: "boolean" },
  dedupe: { type: "boolean" },
} as const;

/** Help lines of the shared options. */
export const exportOptionsHelp = `  --label L             label prefix of every symbol and file (default: from the
                        file name); a letter, then letters, digits, "_"
  --outputs LIST        comma-separated, from ${EXPORT_OUTPUTS.join(",")}
                        (default: all)
  --sign shift|scroll   shift: values as computed (+1 moves right/down);
                        scroll: negated, for scroll registers (default shift)
  --register-bits N     wrap values modulo 2^N as unsigned register values,
                        N from ${REGISTER_BITS.min} to ${REGISTER_BITS.max} (default: signed, no wrap)
  --element TYPE        auto, int8, int16, int32, uint8, uint16 or uint32
                        (default auto: the smallest type that holds every value)
  --split               store 16-bit tables as low and high bytes (L_h_lo, L_h_hi)
  --half                store half of each antisymmetric table (h[H-1-r] = -h[r])
  --dedupe              store identical frames once, with an index table L_frame
`;

const FLAGS: Readonly<Record<string, string>> = {
  label: "--label",
  name: "--label",
  outputs: "--outputs",
  sign: "--sign",
  registerBits: "--register-bits",
  element: "--element",
  split: "--split",
  half: "--half",
  dedupe: "--dedupe",
};

/** An ExportOptionError restated with the command-line option it came from. */
export function optionUsageError(error: ExportOptionError): UsageError {
  const flag = FLAGS[error.field] ?? error.field;
  if (typeof error.value === "boolean") return new UsageError(`${flag} is not available for this effect: ${error.reason ?? error.message}`);
  return new UsageError(`${flag}${error.message.slice(error.field.length)}`);
}

type Values = { [K in keyof typeof exportArgOptions]?: (typeof exportArgOptions)[K]["type"] extends "string" ? string : boolean };

/** The effect's name from its file: the base name without ".json" (and ".effect"). */
export function nameFromPath(path: string): string {
  return basename(path)
    .replace(/\.json$/i, "")
    .replace(/\.effect$/i, "");
}

/** Export options from parsed command-line values; bad words and numbers become a UsageError naming the option. */
export function exportOptionsFromArgs(values: Values, path: string): ExportOptionsInput {
  let outputs: ExportOutput[] | undefined;
  if (values.outputs !== undefined) {
    const words = values.outputs.split(",").map((w) => w.trim());
    for (const w of words)
      if (!(EXPORT_OUTPUTS as readonly string[]).includes(w))
        throw new UsageError(
          `--outputs: ${JSON.stringify(w)} is not allowed; allowed a comma-separated list of ${EXPORT_OUTPUTS.join(", ")}`,
        );
    outputs = words as ExportOutput[];
  }
  let registerBits: number | undefined;
  if (values["register-bits"] !== undefined) {
    const text = values["register-bits"];
    registerBits = /^\d+$/.test(text) ? Number(text) : Number.NaN;
    if (!(registerBits >= REGISTER_BITS.min && registerBits <= REGISTER_BITS.max))
      throw new UsageError(
        `--register-bits: ${JSON.stringify(text)} is not allowed; allowed a whole number from ${REGISTER_BITS.min} to ${REGISTER_BITS.max}`,
      );
  }
  return {
    name: nameFromPath(path),
    ...(values.label !== undefined && { label: values.label }),
    ...(outputs && { outputs }),
    ...(values.sign !== undefined && { sign: values.sign as ExportOptionsInput["sign"] }),
    ...(registerBits !== undefined && { registerBits }),
    ...(values.element !== undefined && { element: values.element as ExportOptionsInput["element"] }),
    split: values.split ?? false,
    half: values.half ?? false,
    dedupe: values.dedupe ?? false,
  };
}

/** Reads the effect file and the shared export options of `export` and `budget`; `diagnostics`: the command may measure the track (its workers then start early). */
export async function readExportArgs<T extends Record<string, { type: "string" | "boolean" }>>(
  args: string[],
  io: CliIo,
  extra: T,
  diagnostics = false,
): Promise<{ effect: Effect; options: ExportOptionsInput; values: Record<string, string | boolean | undefined> }> {
  const { positionals, values } = parseCommandArgs(args, { ...exportArgOptions, ...extra });
  if (positionals.length > 1) throw new UsageError(`one EFFECT.json expected, got ${positionals.length}: ${positionals.join(" ")}`);
  // Only the tables document (output "json") carries diagnostics, so only then are the workers worth starting early.
  const outputs = typeof values.outputs === "string" ? values.outputs.split(",").map((w) => w.trim()) : ["json"];
  const [{ readEffectFile }] = await Promise.all([
    import("./readEffectFile.ts"),
    diagnostics && outputs.includes("json") ? prepareDiagnostics(positionals[0], io) : undefined,
  ]);
  const effect = await readEffectFile(positionals[0], io);
  const options = exportOptionsFromArgs(values as Values, positionals[0]);
  return { effect, options, values: values as Record<string, string | boolean | undefined> };
}

/** Runs `body`, turning an ExportOptionError (thrown, or rejecting the promise it returns) into a UsageError that names the command-line option. */
export function withOptionErrors<T>(body: () => T): T {
  const restate = (error: unknown): never => {
    if (error instanceof ExportOptionError) throw optionUsageError(error);
    throw error;
  };
  try {
    const result = body();
    return (result instanceof Promise ? result.catch(restate) : result) as T;
  } catch (error) {
    return restate(error);
  }
}

/** `skewsmith export EFFECT.json --out DIR`: writes the export bundle's files (C, assembler, binaries, JSON, run-time routine, README) and/or its zip. */
export const exportCommand: Command = {
  summary: "write the tables as C, assembler (6502, 68k, ARM, Z80), binary and JSON files",
  help: `usage: skewsmith export EFFECT.json --out DIR [options]
       skewsmith export EFFECT.json --zip FILE [options]

Writes the export bundle of the effect into DIR and/or as one zip file:
  L.h, L.c          C99 tables (<stdint.h>), usable from C++
  L.6502.s          ca65 source for the 6502/65816
  L.68k.s           68000 source (GNU as, Motorola-style dc.b/dc.w/dc.l)
  L.arm.s           ARM source (GNU as)
  L.z80.s           Z80/SM83 source (GNU as)
  L.le.bin, L.be.bin  raw tables, little- and big-endian
  L.json            the tables document
  L_runtime.c       C routine computing one frame's tables at run time
  L.effect.json     the effect document, README.txt  what each file holds
where L is the label prefix. Prints the files written.

options:
  --out DIR             folder to write the files into (made when missing)
  --zip FILE            also (or only) write the bundle as a zip file
${exportOptionsHelp}`,
  async run(args, io) {
    const { effect, options, values } = await readExportArgs(args, io, { out: { type: "string" }, zip: { type: "string" } }, true);
    const out = values.out as string | undefined;
    const zip = values.zip as string | undefined;
    if (out === undefined && zip === undefined) throw new UsageError("--out DIR or --zip FILE is required (where to write the bundle)");
    const { exportBundle, exportBundleZipping } = await import("../export/bundle.ts");
    const bundle =
      zip === undefined
        ? withOptionErrors(() => exportBundle(effect, options))
        : await withOptionErrors(() => exportBundleZipping(effect, options));
    if (out !== undefined) {
      await mkdir(out, { recursive: true });
      for (const f of bundle.files) {
        const path = join(out, f.name);
        await io.writeFile(path, f.bytes);
        io.stdout(`${path}\t${f.bytes.length} bytes\n`);
      }
    }
    if (zip !== undefined) {
      const bytes = await bundle.zipAsync();
      await io.writeFile(zip, bytes);
      io.stdout(`${zip}\t${bytes.length} bytes\n`);
    }
    io.stderr(`skewsmith export: label ${bundle.label}, ${bundle.budget.totalBytes} bytes of tables (see README.txt for the budget)\n`);
    return 0;
  },
};
