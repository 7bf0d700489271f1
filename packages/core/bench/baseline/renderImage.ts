// The implementation as it was before issue 10's speed-ups, kept unchanged as the benchmarks' baseline: every speed-up
// is measured against it in the same run. Not used by the product; do not edit (bench/README.md).
import { imageFromPlane, imagePlane, type Image } from "../../src/image.ts";
import { Renderer, type FrameShifts, type PassNumber, type RenderGeometry } from "./render.ts";

/**
 * Draws one frame of a canvas-sized image as the target does (spec §5), up to pass `pass` (1, 2 or 3): an indexed
 * image stays indexed with the same palette, RGBA stays RGBA. Allocates; use Renderer directly to reuse buffers.
 */
export function renderImage(image: Image, frame: FrameShifts, geometry: RenderGeometry, pass: PassNumber = 3): Image {
  const { width, height } = geometry.canvas;
  if (image.width !== width || image.height !== height)
    throw new RangeError(`image: ${image.width}×${image.height} pixels; must equal the canvas, ${width}×${height}`);
  const plane = imagePlane(image);
  const renderer = plane instanceof Uint8Array ? new Renderer(width, height, Uint8Array) : new Renderer(width, height, Uint32Array);
  const out = (renderer as Renderer<typeof plane>).render(plane, frame, geometry, pass);
  return imageFromPlane(image, out);
}
