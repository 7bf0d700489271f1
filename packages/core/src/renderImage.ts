import { imagePlane, type Image } from "./image.ts";
import { Renderer, type FrameShifts, type PassNumber, type RenderGeometry } from "./render.ts";

/**
 * Renderers kept for renderImage, one per canvas size and pixel kind, most recently used last. A renderer holds one
 * canvas-sized scratch plane (pass 1 lands there; the column pass gathers from it straight into the output), so a few
 * are kept, not all: a 4K RGBA plane is 33 MB.
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
 * caller's, as many bytes as the image's, apart from it), else a new buffer; either way the last pass stores straight
 * into them. The renderer behind it is kept for the next call of the same size and kind.
 */
export function renderImage(image: Image, frame: FrameShifts, geometry: RenderGeometry, pass: PassNumber = 3, out?: Uint8Array): Image {
  const { width, height } = geometry.canvas;
  if (image.width !== width || image.height !== height)
    throw new RangeError(`image: ${image.width}×${image.height} pixels; must equal the canvas, ${width}×${height}`);
  if (out !== undefined && out.length !== image.data.length)
    throw new RangeError(`out: ${out.length} bytes, expected ${image.data.length} (the image's)`);
  const data = out ?? new Uint8Array(image.data.length);
  const renderer = rendererFor(width, height, image.kind);
  const src = imagePlane(image);
  if (image.kind === "indexed") (renderer as Renderer<Uint8Array>).renderInto(src as Uint8Array, data, frame, geometry, pass);
  else if (data.byteOffset % 4 === 0)
    (renderer as Renderer<Uint32Array>).renderInto(
      src as Uint32Array,
      new Uint32Array(data.buffer, data.byteOffset, data.length / 4),
      frame,
      geometry,
      pass,
    );
  else {
    // A caller's buffer that 32-bit words cannot view: render into a word plane, then copy its bytes.
    const words = new Uint32Array(width * height);
    (renderer as Renderer<Uint32Array>).renderInto(src as Uint32Array, words, frame, geometry, pass);
    data.set(new Uint8Array(words.buffer));
  }
  return image.kind === "indexed" ? { ...image, data } : { kind: "rgba", width, height, data };
}
