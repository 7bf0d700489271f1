import { parseCommandArgs } from "./args.ts";
import { UsageError, type Command } from "./io.ts";

/** `skewsmith fit EFFECT.json [--image SPRITE.png]`: the smallest canvas on which nothing wraps or clips. */
export const fitCommand: Command = {
  summary: "find the smallest canvas (and margins around a sprite) on which no pixel wraps or clips",
  help: `usage: skewsmith fit EFFECT.json [--image CANVAS.png] [--align N] [--json]

Follows every pixel through every frame and prints the smallest canvas that
holds all of them in every pass, with the pivot moved to match. Without
--image every canvas pixel counts; with --image (canvas-sized) only its
non-background pixels do (opaque RGBA pixels, or palette index other than 0).

options:
  --image CANVAS.png  measure the picture's own pixels, not the whole canvas
  --align N           round width and height up to a multiple of N pixels
  --json              print the result as one JSON object
`,
  async run(args, io) {
    const { positionals, values } = parseCommandArgs(args, {
      image: { type: "string" },
      align: { type: "string" },
      json: { type: "boolean" },
    });
    const [{ readEffectFile }, { readCanvasImage }, { canvasFit }, { opaqueMask }] = await Promise.all([
      import("./readEffectFile.ts"),
      import("./readCanvasImage.ts"),
      import("../canvasFit.ts"),
      import("../image.ts"),
    ]);
    const effect = await readEffectFile(positionals[0], io);
    let mask: Uint8Array | undefined;
    if (values.image) mask = opaqueMask(await readCanvasImage(values.image, effect, io));
    let align: number | undefined;
    if (values.align !== undefined) {
      align = Number(values.align);
      if (!/^\d+$/.test(values.align) || align < 1 || align > 4096)
        throw new UsageError(`--align: "${values.align}" is not allowed; allowed a whole number from 1 to 4096`);
    }
    const fit = canvasFit(effect, { mask, align });
    if (values.json) {
      io.stdout(`${JSON.stringify(fit)}\n`);
      return 0;
    }
    const { width, height } = effect.canvas;
    const side = (n: number) => (n > 0 ? `+${n}` : String(n));
    const c = fit.change;
    const m = fit.margin;
    io.stdout(
      [
        fit.fitsNow
          ? `The ${width}×${height} canvas already holds every frame: nothing wraps or clips.`
          : `On the ${width}×${height} canvas some pixels wrap or clip; frame ${fit.worstFrame} reaches furthest out.`,
        `Smallest canvas: ${fit.width}×${fit.height}${fit.withinLimits ? "" : " (larger than the 4096-pixel limit)"}`,
        `Change per side: left ${side(c.left)}, right ${side(c.right)}, top ${side(c.top)}, bottom ${side(c.bottom)} pixels`,
        `Pivot on the new canvas: (${fit.pivot.x}, ${fit.pivot.y})`,
        `Content: ${fit.content.width}×${fit.content.height} at (${fit.content.x}, ${fit.content.y}); margin around it: left ${m.left}, right ${m.right}, top ${m.top}, bottom ${m.bottom}`,
        "",
      ].join("\n"),
    );
    return 0;
  },
};
