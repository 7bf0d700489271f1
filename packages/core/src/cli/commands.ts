import { budgetCommand } from "./budget.ts";
import { exportCommand } from "./export.ts";
import type { Command } from "./io.ts";
import { fitCommand } from "./fit.ts";
import { pullCommand } from "./pull.ts";
import { renderCommand } from "./render.ts";
import { tablesCommand } from "./tables.ts";

/** Every subcommand of `skewsmith`, in the order the help lists them. */
export const commands: Readonly<Record<string, Command>> = {
  tables: tablesCommand,
  render: renderCommand,
  fit: fitCommand,
  export: exportCommand,
  budget: budgetCommand,
  pull: pullCommand,
};
