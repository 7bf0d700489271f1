/**
 * Run by render.test.ts in a Node started with --disallow-code-generation-from-strings, as a page or worker whose
 * content security policy forbids eval runs the core: every renderer then uses the loops written out in render.ts
 * instead of the ones compiled at run time. Renders the frames it reads from standard input (JSON: canvas, pivot, edge
 * rule, tables, pass) with words, bytes and 16-bit planes, on the renderer's own planes and into the caller's, and
 * prints what each gave, for the test to compare with the reference.
 */
import { readFileSync } from "node:fs";
import { Renderer, type PassNumber, type RenderGeometry, type FrameShifts } from "../../src/index.ts";

interface Case {
  geometry: RenderGeometry;
  frame: FrameShifts;
  pass: PassNumber;
  src: number[];
}

let compiles = true;
try {
  new Function("return 1")();
} catch {
  compiles = false;
}
const cases = JSON.parse(readFileSync(0, "utf8")) as Case[];
const out = cases.map(({ geometry, frame, pass, src }) => {
  const { width: W, height: H } = geometry.canvas;
  const words = new Renderer(W, H, Uint32Array);
  const bytes = new Renderer(W, H, Uint8Array);
  const halves = new Renderer(W, H, Uint16Array);
  const into = new Uint32Array(W * H).fill(0xeeeeeeee);
  words.renderInto(Uint32Array.from(src), into, frame, geometry, pass);
  const bytesInto = new Uint8Array(W * H).fill(0xee);
  bytes.renderInto(
    Uint8Array.from(src, (x) => x & 0xff),
    bytesInto,
    frame,
    geometry,
    pass,
  );
  return {
    words: Array.from(words.render(Uint32Array.from(src), frame, geometry, pass)),
    wordsInto: Array.from(into),
    bytes: Array.from(
      bytes.render(
        Uint8Array.from(src, (x) => x & 0xff),
        frame,
        geometry,
        pass,
      ),
    ),
    bytesInto: Array.from(bytesInto),
    halves: Array.from(
      halves.render(
        Uint16Array.from(src, (x) => x & 0xffff),
        frame,
        geometry,
        pass,
      ),
    ),
  };
});
process.stdout.write(JSON.stringify({ compiles, out }));
