import type { Effect } from "../effect.ts";
import type { Image } from "../image.ts";
import { decodePng, PngError } from "../png.ts";
import { UsageError, type CliIo } from "./io.ts";

/** Reads the PNG given to --image and checks it is exactly the effect's canvas size; problems become a UsageError naming the file. */
export async function readCanvasImage(path: string, effect: Effect, io: CliIo): Promise<Image> {
  let image: Image;
  try {
    image = decodePng(await io.readFile(path));
  } catch (error) {
    if (error instanceof PngError) throw new UsageError(`--image ${path}: ${error.message}`);
    throw error;
  }
  const { width, height } = effect.canvas;
  if (image.width !== width || image.height !== height)
    throw new UsageError(`--image ${path}: ${image.width}×${image.height} pixels; must equal the effect's canvas, ${width}×${height}`);
  return image;
}
