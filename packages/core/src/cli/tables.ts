import { parseCommandArgs } from "./args.ts";
import { prepareDiagnostics, type Command } from "./io.ts";

/** `skewsmith tables EFFECT.json`: prints the tables document (spec §8) as one JSON object. */
export const tablesCommand: Command = {
  summary: "print every frame's coefficients, shift tables and diagnostics as JSON",
  help: `usage: skewsmith tables EFFECT.json [--pretty]

Prints the tables document (format "skewsmith.tables/1") of the effect: for every
frame its angle, half-turn flip, coefficients kα and kβ, the row table h (one
entry per canvas row) and column table v (one per canvas column), and the
per-frame diagnostics (max and mean error in pixels, wrapped, clipped,
saturated, largest shift).

options:
  --pretty   indent the JSON for reading
`,
  async run(args, io) {
    const { positionals, values } = parseCommandArgs(args, { pretty: { type: "boolean" } });
    // The work is loaded when a command runs, so that --help and --version start at once; a large track's diagnostics
    // workers start first, to load beside the rest.
    const [{ readEffectFile }, { tablesText, tableListTexts }, { compileShifts, withDiagnostics }, { beginDiagnoseTrack }, json] =
      await Promise.all([
        import("./readEffectFile.ts"),
        import("../tablesDocument.ts"),
        import("../compileTables.ts"),
        import("../diagnostics/diagnoseTrack.ts"),
        import("../export/json.ts"),
        prepareDiagnostics(positionals[0], io),
      ]);
    const effect = await readEffectFile(positionals[0], io);
    if (values.pretty) {
      io.stdout(tablesText(effect, { pretty: true }));
      return 0;
    }
    // tablesText's very bytes, printed a few hundred frames at a time rather than built whole and then encoded whole.
    // The tables are printed while the workers measure; the figures are added once they are in.
    const shifts = compileShifts(effect);
    const pending = beginDiagnoseTrack(effect, shifts.frames);
    const lists = tableListTexts(shifts.frames, false);
    const tables = withDiagnostics(shifts, pending.finish());
    for (const piece of json.tablesDocumentPieces(tables, false, json.FRAMES_PER_PIECE, lists)) io.stdout(piece);
    io.stdout("\n");
    return 0;
  },
};
