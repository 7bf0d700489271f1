// Golden outputs: `skewsmith tables`, `render` and `export` on the test suite's effects (and more that reach the fast
// paths) give exactly the bytes recorded from the code before the speed-ups (test/golden/record.ts). The one figure
// allowed to move is meanErrorPx, by at most 1e-9 px: a faster diagnostics pass may add the same distances in another
// order (docs/shear-core.md §6). Everything else is compared byte for byte, through hashes that name the job, the frame
// or the file that moved.
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { Renderer, imagePlane, parseEffect } from "../../src/index.ts";
import { EXPORT_JOBS, RENDER_JOBS, TABLES_JOBS } from "./cases.ts";
import { FULL_FILES, filesUrl, fixturesUrl, type Fixtures } from "./fixtures.ts";
import { exportOutput, hash, jobFrame, renderOutputs, splitMeans, tablesOutput, testImage, type TablesDigest } from "./outputs.ts";

/** How far a mean error may move from the recorded one, in pixels (issue 10, item 4). */
const MEAN_TOLERANCE_PX = 1e-9;

const fixtures = JSON.parse(readFileSync(fixturesUrl, "utf8")) as Fixtures;
const dir = mkdtempSync(join(tmpdir(), "skewsmith-golden-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
/** A fresh folder for one job's files. */
const workdir = () => mkdtempSync(join(dir, "job-"));

/** The frames whose mean moved by more than the tolerance, as "frame: got, recorded" lines. */
function movedMeans(got: readonly number[], want: readonly number[]): string[] {
  const moved: string[] = [];
  want.forEach((w, i) => {
    if (!(Math.abs(got[i] - w) <= MEAN_TOLERANCE_PX)) moved.push(`frame ${i}: meanErrorPx ${got[i]}, recorded ${w}`);
  });
  return moved;
}

function expectTables(got: TablesDigest, want: TablesDigest, what: string): void {
  expect(got.head, `${what}: format, effect or element type moved`).toBe(want.head);
  expect(got.means.length, `${what}: number of frames`).toBe(want.means.length);
  const gotFrames = got.frames.split(" ");
  const moved = want.frames
    .split(" ")
    .flatMap((h, i) => (gotFrames[i] === h ? [] : [i]))
    .slice(0, 10);
  expect(moved, `${what}: frames whose tables or diagnostics other than meanErrorPx moved`).toEqual([]);
  expect(movedMeans(got.means, want.means), `${what}: mean errors beyond ${MEAN_TOLERANCE_PX} px`).toEqual([]);
  expect(got.text, `${what}: the document's text (means aside) moved`).toBe(want.text);
}

describe("skewsmith tables prints the recorded documents", () => {
  it.each(TABLES_JOBS.map((job) => [job.id, job] as const))("%s", async (id, job) => {
    const want = fixtures.tables[id];
    expect(want, `no fixture for "${id}": record it (test/golden/record.ts)`).toBeDefined();
    const { text, digest } = await tablesOutput(job, workdir());
    expectTables(digest, want, id);
    const full = FULL_FILES.tables[id];
    if (full) {
      const recorded = splitMeans(readFileSync(new URL(full, filesUrl), "utf8"));
      const now = splitMeans(text);
      expect(now.text, `${id}: differs from files/${full}`).toBe(recorded.text);
      expect(movedMeans(now.means, recorded.means)).toEqual([]);
    }
  });
});

describe("skewsmith render and renderImage draw the recorded pixels", () => {
  it.each(RENDER_JOBS.map((job) => [job.id, job] as const))("%s", { timeout: 120_000 }, async (id, job) => {
    const want = fixtures.render[id];
    expect(want, `no fixture for "${id}"`).toBeDefined();
    const got = await renderOutputs(job, workdir());
    const label = (d: { frame: number; pass: number }) => `frame ${d.frame} pass ${d.pass}`;
    expect(got.map((d) => `${label(d)}: pixels ${d.pixels}`)).toEqual(want.map((d) => `${label(d)}: pixels ${d.pixels}`));
    expect(got.map((d) => `${label(d)}: png ${d.png ?? "-"}`)).toEqual(want.map((d) => `${label(d)}: png ${d.png ?? "-"}`));
    if (job.via === "api") {
      // One renderer kept across every frame and pass, the way a caller reuses it, draws the same pixels.
      const effect = parseEffect(job.effect);
      const image = testImage(job.image, effect.canvas.width, effect.canvas.height);
      const plane = imagePlane(image);
      const kind = plane.constructor as new (length: number) => Uint8Array | Uint32Array;
      const renderer = new Renderer<Uint8Array | Uint32Array>(effect.canvas.width, effect.canvas.height, kind);
      for (const d of want) {
        const out = renderer.render(plane, jobFrame(job, d.frame), effect, d.pass as 1 | 2 | 3);
        const bytes = new Uint8Array(out.buffer, out.byteOffset, out.byteLength);
        expect(`${label(d)}: ${hash(bytes)}`, `${id}: Renderer.render`).toBe(`${label(d)}: ${d.pixels}`);
      }
    }
  });
});

describe("skewsmith export writes the recorded bundle files and zip entries", () => {
  it.each(EXPORT_JOBS.map((job) => [job.id, job] as const))("%s", async (id, job) => {
    const want = fixtures.export[id];
    expect(want, `no fixture for "${id}"`).toBeDefined();
    const { digest, files } = await exportOutput(job, workdir());
    expect(digest.stdout, `${id}: the files listed and their sizes`).toBe(want.stdout);
    expect(digest.stderr).toBe(want.stderr);
    expect(digest.files.map((f) => `${f.name} ${f.bytes} ${f.hash}`)).toEqual(want.files.map((f) => `${f.name} ${f.bytes} ${f.hash}`));
    for (const [i, f] of want.files.entries())
      if (f.means) expect(movedMeans(digest.files[i].means ?? [], f.means), `${id}: ${f.name} mean errors`).toEqual([]);
    const entry = (e: Fixtures["export"][string]["zip"][number]) =>
      `${e.name} crc ${e.crc} ${e.bytes} bytes, time ${e.dosTime} date ${e.dosDate}, ${e.hash}`;
    expect(digest.zip.map(entry), `${id}: zip entries`).toEqual(want.zip.map(entry));
    for (const [name, file] of Object.entries(FULL_FILES.export[id] ?? {}))
      expect(new TextDecoder().decode(files.get(name)), `${id}: ${name} differs from files/${file}`).toBe(
        readFileSync(new URL(file, filesUrl), "utf8"),
      );
  });
});
