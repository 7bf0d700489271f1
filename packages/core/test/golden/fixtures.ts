import type { ExportDigest, RenderDigest, TablesDigest } from "./outputs.ts";

/** The recorded outputs: per job id, the digests outputs.ts makes. */
export interface Fixtures {
  tables: Record<string, TablesDigest>;
  render: Record<string, RenderDigest[]>;
  export: Record<string, ExportDigest>;
}

export const fixturesUrl = new URL("./fixtures.json", import.meta.url);
export const filesUrl = new URL("./files/", import.meta.url);

/** Outputs also kept whole, so that a reader sees what the hashes stand for: job id → file under files/. */
export const FULL_FILES: {
  readonly tables: Readonly<Record<string, string>>;
  readonly export: Readonly<Record<string, Readonly<Record<string, string>>>>;
} = {
  tables: { "cli flips and groups 8×2": "flips-and-groups.tables.txt", "case q1.7, trunc half": "q17.tables.txt" },
  export: {
    "case odd, 9-bit register uint16": { "README.txt": "odd.README.txt", "odd.c": "odd.c", "odd.68k.s": "odd.68k.s" },
    "case storm, 10-bit scroll register split half dedupe": { "storm.6502.s": "storm.6502.s" },
  },
};
