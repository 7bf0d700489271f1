/**
 * The effect bench's speed in headless Chromium (issue 7, item 10), on the demo's storm effect (256 × 224, 48 frames):
 *   - tables and diagnostics of the whole track after a settings change, through the bench's worker, against core's
 *     tables alone (compileShifts, no diagnostics) measured in the same page;
 *   - one frame at zoom 3, against one putImageData of the same canvas's pixels: while playing (the preview's
 *     FrameFeed asks the worker for the next frames ahead, so the page's part is the drawing), and for a frame not
 *     asked ahead (the worker's round trip included), with where its time goes.
 * Targets: a frame drawn within 2× the plain putImageData; the whole track under 100 ms. It prints numbers, never verdicts.
 *
 * Run: `npx --yes pnpm@10.34.9 bench:bench [rounds]` (default 15).
 */
import { createServer } from "node:http";
import { mkdirSync, readFileSync, writeFileSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { encodePng } from "@skewsmith/core";
import { chromium } from "playwright-core";
import { build } from "vite";
import { stormBackground } from "../app/demo/art.ts";
import { CHROMIUM, CHROMIUM_ARGS } from "../tests/e2e/chromium.ts";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
const OUT = path.join(ROOT, ".tmp/effect-bench");
const rounds = Number(process.argv[2] ?? 15);

mkdirSync(OUT, { recursive: true });
await build({
  configFile: false,
  root: path.join(ROOT, "bench/effect-bench"),
  logLevel: "warn",
  worker: { format: "es" },
  build: { outDir: OUT, emptyOutDir: true },
});
writeFileSync(path.join(OUT, "storm.png"), encodePng(stormBackground(256, 224)));

const TYPES: Record<string, string> = { ".html": "text/html", ".js": "text/javascript", ".png": "image/png", ".css": "text/css" };
const server = createServer((req, res) => {
  const file = path.join(
    OUT,
    path.normalize(decodeURIComponent(new URL(req.url ?? "/", "http://x").pathname)).replace(/^\/+/, "") || "index.html",
  );
  try {
    if (!file.startsWith(OUT)) throw new Error("outside");
    const body = readFileSync(file.endsWith(path.sep) || file === OUT ? path.join(OUT, "index.html") : file);
    res.writeHead(200, { "Content-Type": TYPES[path.extname(file)] ?? "application/octet-stream" }).end(body);
  } catch {
    res.writeHead(404).end();
  }
});
await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", resolve));
const port = (server.address() as { port: number }).port;

const browser = await chromium.launch({ executablePath: CHROMIUM, args: CHROMIUM_ARGS, headless: true });
try {
  const page = await browser.newPage();
  page.on("pageerror", (e) => console.error("page error:", e.message));
  await page.goto(`http://127.0.0.1:${port}/index.html?rounds=${rounds}`);
  const r = await page.evaluate(() => (window as unknown as { benchResult: Promise<Record<string, number>> }).benchResult);
  const ms = (n: number) => `${n.toFixed(3)} ms`;
  console.log(`effect bench, storm effect 256 × 224, 48 frames, medians of ${rounds} rounds (frames in batches of 24), Chromium headless`);
  console.log(`  whole track, tables + diagnostics after a settings change (worker): ${ms(r.trackMs)}   target under 100 ms`);
  console.log(
    `    baseline, core's tables without diagnostics (page):              ${ms(r.tablesMs)}   ratio ${(r.trackMs / r.tablesMs).toFixed(1)}×`,
  );
  const vsPut = (n: number) => `ratio ${(n / r.putImageDataMs).toFixed(2)}×`;
  console.log(`  one frame at zoom 3, against one putImageData of the same 768 × 672 canvas: ${ms(r.putImageDataMs)}`);
  console.log(
    `    playing (frames asked ahead), the page's part per frame:           ${ms(r.playbackPageMs)}   ${vsPut(r.playbackPageMs)}   target within 2×`,
  );
  console.log(`    playing, wall time per frame (the worker rendering ahead):         ${ms(r.playbackMs)}   ${vsPut(r.playbackMs)}`);
  console.log(`    a frame not asked ahead, computed (worker) and drawn:              ${ms(r.frameMs)}   ${vsPut(r.frameMs)}`);
  console.log(`      the drawing alone (page, pixels zoomed by the worker):           ${ms(r.drawMs)}   ${vsPut(r.drawMs)}`);
  console.log(`      the drawing the old way (1× stage, scaled drawImage):            ${ms(r.drawScaledMs)}   ${vsPut(r.drawScaledMs)}`);
  console.log(`      the worker's part alone (render, colours, zoom, round trip):     ${ms(r.workerMs)}`);
} finally {
  await browser.close();
  server.close();
}
