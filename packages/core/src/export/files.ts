import { effectFileName } from "./header.ts";
import type { ExportOutput } from "./options.ts";

/** The file names each output makes for label prefix L. */
export function outputFiles(label: string): Readonly<Record<ExportOutput, readonly string[]>> {
  return {
    c: [`${label}.h`, `${label}.c`],
    "6502": [`${label}.6502.s`],
    "68k": [`${label}.68k.s`],
    arm: [`${label}.arm.s`],
    z80: [`${label}.z80.s`],
    bin: [`${label}.le.bin`, `${label}.be.bin`],
    json: [`${label}.json`],
    runtime: [`${label}_runtime.c`],
  };
}

/** Files every bundle holds whatever the outputs: the README and the effect document it can be regenerated from. */
export function alwaysFiles(label: string): readonly string[] {
  return ["README.txt", effectFileName(label)];
}
