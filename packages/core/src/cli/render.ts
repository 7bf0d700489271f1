import { parseCommandArgs } from "./args.ts";
import { UsageError, type Command } from "./io.ts";

function wholeNumberOption(name: string, text: string | undefined, min: number, max: number): number | undefined {
  if (text === undefined) return undefined;
  const n = Number(text);
  if (!/^-?\d+$/.test(text) || n < min || n > max)
    throw new UsageError(`--${name}: "${text}" is not allowed; allowed a whole number from ${min} to ${max}`);
  return n;
}

/** `skewsmith render EFFECT.json --image IN.png --frame N --out OUT.png [--pass 1|2|3]`: draws one frame as the target does. */
export const renderCommand: Command = {
  summary: "draw one frame of a canvas-sized PNG exactly as the target will",
  help: `usage: skewsmith render EFFECT.json --image IN.png --frame N --out OUT.png [--pass 1|2|3]

Draws frame N (0-based) of the effect's angle track: half-turn flip if the
frame has one, then row pass, column pass and row pass, with the effect's
edge rule. IN.png must be exactly the effect's canvas size (place a sprite
into a canvas-sized PNG first). An indexed (palette) PNG stays indexed with
the same palette, index 0 being the background; any other PNG is drawn as
RGBA with a transparent background.

options:
  --image IN.png   the canvas-sized picture to turn (required)
  --frame N        frame index, 0 to frames − 1 (required)
  --out OUT.png    where to write the result (required)
  --pass P         stop after pass 1 (flip and first row pass), 2 (column pass)
                   or 3 (the finished frame, default)
`,
  async run(args, io) {
    const { positionals, values } = parseCommandArgs(args, {
      image: { type: "string" },
      frame: { type: "string" },
      out: { type: "string" },
      pass: { type: "string" },
    });
    const [{ readEffectFile }, { readCanvasImage }, { angleTrack }, { compileFrame }, { encodePng }, { renderImageView }] =
      await Promise.all([
        import("./readEffectFile.ts"),
        import("./readCanvasImage.ts"),
        import("../angleTrack.ts"),
        import("../compileTables.ts"),
        import("../png.ts"),
        import("../renderImage.ts"),
      ]);
    const effect = await readEffectFile(positionals[0], io);
    if (!values.image) throw new UsageError("--image: required (the canvas-sized PNG to turn)");
    if (!values.out) throw new UsageError("--out: required (where to write the PNG)");
    const angles = angleTrack(effect.angles);
    const frame = wholeNumberOption("frame", values.frame, 0, angles.length - 1);
    if (frame === undefined) throw new UsageError(`--frame: required; allowed a whole number from 0 to ${angles.length - 1}`);
    const pass = (wholeNumberOption("pass", values.pass, 1, 3) ?? 3) as 1 | 2 | 3;
    const image = await readCanvasImage(values.image, effect, io);
    const tables = compileFrame(effect, frame, angles[frame]);
    // The frame is encoded at once and nothing else renders before the process ends: no copy of it is needed.
    await io.writeFile(values.out, encodePng(renderImageView(image, tables, effect, pass)));
    return 0;
  },
};
