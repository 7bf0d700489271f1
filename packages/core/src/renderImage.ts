import { imagePlane, type Image } from "./image.ts";
import { Renderer, type FrameShifts, type PassNumber, type RenderGeometry } from "./render.ts";

/**
 * Renderers kept for renderImage, one per canvas size and pixel kind, most recently used last. A renderer holds two
 * canvas-sized planes, so a few are kept, not all: a 4K RGBA plane is 33 MB.
 */
const RENDERERS = new Map<string, Renderer<Uint8Array> | Renderer<Uint32Array>>();
const KEPT_RENDERERS = 4;

function rendererFor(width: number, height: number, kind: Image["kind"]): Renderer<Uint8Array> | Renderer<Uint32Array> {
  const key = `${width}×${height} ${kind}`;
  let renderer = RENDERERS.get(key);
  if (renderer === undefined) {
    renderer = kind === "indexed" ? new Renderer(width, height, Uint8Array) : new Renderer(width, height, Uint32Array);
    if (RENDERERS.size >= KEPT_RENDERERS) RENDERERS.delete(RENDERERS.keys().next().value!);
  } else RENDERERS.delete(key);
  RENDERERS.set(key, renderer);
  return renderer;
}

/**
 * Draws one frame of a canvas-sized image as the target does (spec §5), up to pass `pass` (1, 2 or 3): an indexed
 * image stays indexed with the same palette, RGBA stays RGBA. The result's pixels are `out` when given (a buffer of the
 * caller's, as many bytes as the image's, apart from it), else a new buffer. The renderer behind it is kept for the next
 * call of the same size and kind.
 *
 * The frame is drawn on the kept renderer's own planes and then copied into the result in one block: its column pass
 * is compiled for those planes (Renderer's ownGather), and measured faster, copy included, than the same pass storing
 * straight into the caller's buffer through the shared loop (bench/renderImage.bench.ts).
 */
export function renderImage(image: Image, frame: FrameShifts, geometry: RenderGeometry, pass: PassNumber = 3, out?: Uint8Array): Image {
  checkCanvas(image, geometry);
  if (out !== undefined && out.length !== image.data.length)
    throw new RangeError(`out: ${out.length} bytes, expected ${image.data.length} (the image's)`);
  if (
    out !== undefined &&
    out.buffer === image.data.buffer &&
    out.byteOffset < image.data.byteOffset + image.data.byteLength &&
    image.data.byteOffset < out.byteOffset + out.byteLength
  )
    throw new RangeError("out: shares memory with the source image; the result needs a buffer of its own");
  const bytes = renderedBytes(image, frame, geometry, pass);
  const data = out ?? new Uint8Array(bytes.length);
  data.set(bytes);
  return withData(image, data);
}

/**
 * renderImage without the copy: the result's pixels are the kept renderer's own plane, valid only until the next
 * renderImage or renderImageView of the same canvas size and kind. For a caller that uses the frame at once and keeps
 * nothing of it (the command line encodes it and exits): on a 1920 × 1080 RGBA frame the copy into a new buffer cost
 * about as much as the column pass, most of it the first touches of the new buffer's pages.
 */
export function renderImageView(image: Image, frame: FrameShifts, geometry: RenderGeometry, pass: PassNumber = 3): Image {
  checkCanvas(image, geometry);
  return withData(image, renderedBytes(image, frame, geometry, pass));
}

function checkCanvas(image: Image, geometry: RenderGeometry): void {
  const { width, height } = geometry.canvas;
  if (image.width !== width || image.height !== height)
    throw new RangeError(`image: ${image.width}×${image.height} pixels; must equal the canvas, ${width}×${height}`);
}

function withData(image: Image, data: Uint8Array): Image {
  return image.kind === "indexed" ? { ...image, data } : { kind: "rgba", width: image.width, height: image.height, data };
}

/** The frame drawn on the kept renderer's own planes, as bytes over the plane it ends on. */
function renderedBytes(image: Image, frame: FrameShifts, geometry: RenderGeometry, pass: PassNumber): Uint8Array {
  const renderer = rendererFor(image.width, image.height, image.kind);
  const src = imagePlane(image);
  const plane =
    image.kind === "indexed"
      ? (renderer as Renderer<Uint8Array>).render(src as Uint8Array, frame, geometry, pass)
      : (renderer as Renderer<Uint32Array>).render(src as Uint32Array, frame, geometry, pass);
  return new Uint8Array(plane.buffer, plane.byteOffset, plane.byteLength);
}
