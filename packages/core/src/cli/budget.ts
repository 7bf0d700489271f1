import { resolveExportOptions } from "../export/options.ts";
import { exportOptionsHelp, readExportArgs, withOptionErrors } from "./export.ts";
import type { Command } from "./io.ts";

/** `skewsmith budget EFFECT.json [options]`: prints the ROM cost of an export (bytes per table, per output, per option) without writing it. */
export const budgetCommand: Command = {
  summary: "print the ROM bytes an export would take, per table, output and option",
  help: `usage: skewsmith budget EFFECT.json [options] [--json]

Prints what \`skewsmith export\` with the same options would store: bytes per
table and in all, per output (with each output's alignment padding), and for
every option what it saves (or would save) against the same export without it.

options:
  --json                print the budget as one JSON object
${exportOptionsHelp}`,
  async run(args, io) {
    const { effect, options, values } = await readExportArgs(args, io, { json: { type: "boolean" } });
    const [{ compileShifts }, { budgetFromTables, budgetText }] = await Promise.all([
      import("../compileTables.ts"),
      import("../export/budget.ts"),
    ]);
    const report = withOptionErrors(() => budgetFromTables(compileShifts(effect), resolveExportOptions(options)));
    io.stdout(values.json ? `${JSON.stringify(report, null, 2)}\n` : budgetText(report));
    return 0;
  },
};
