/** axe-core on every page of the app, in the browser: no serious or critical violation anywhere. */
import { readFileSync } from "node:fs";
import { createRequire } from "node:module";
import type { Page } from "playwright-core";
import { describe, expect, it } from "vitest";
import { benchWorld, waitForTable } from "./benchWorld.ts";
import { openPage, screenshot, signInAs, browserAndDb } from "./support.ts";

const AXE_SOURCE = readFileSync(createRequire(import.meta.url).resolve("axe-core/axe.min.js"), "utf8");
const e2e = browserAndDb();
const { db } = e2e;

/** The serious and critical violations axe finds on the page, as "rule: targets" lines. */
async function violations(page: Page): Promise<string[]> {
  // Evaluated through the browser's debugging protocol: the page's policy rightly refuses an injected inline script.
  if (!(await page.evaluate(() => "axe" in window))) await page.evaluate(AXE_SOURCE);
  const found = await page.evaluate(async () => {
    const axe = (
      window as unknown as {
        axe: { run: (c: Document, o: object) => Promise<{ violations: { id: string; impact: string; nodes: { target: string[] }[] }[] }> };
      }
    ).axe;
    const result = await axe.run(document, { resultTypes: ["violations"] });
    return result.violations
      .filter((v) => v.impact === "serious" || v.impact === "critical")
      .map((v) => `${v.id}: ${v.nodes.map((n) => n.target.join(" ")).join(", ")}`);
  });
  return found;
}

describe("accessibility", () => {
  it("finds no serious or critical violation on any page", async () => {
    const world = await benchWorld(
      db,
      { canvas: { width: 24, height: 24 }, pivot: { x: 12, y: 12 }, angles: { sweep: { from: 0, to: 90, frames: 8 } } },
      { sprite: true },
    );
    const signedOut = await openPage(e2e.browser);
    await signedOut.page.goto("/sign-in");
    const problems: string[] = [];
    const check = async (page: Page, name: string) => problems.push(...(await violations(page)).map((v) => `${name}: ${v}`));
    await check(signedOut.page, "sign-in");
    await signedOut.context.close();

    const editor = await signInAs(e2e.browser, world.editor);
    const pages: [string, string][] = [
      ["home", "/"],
      ["team", `/teams/${world.team.id}`],
      ["new team", "/teams/new"],
      ["project", `/projects/${world.project.id}`],
      ["mailbox", "/dev/mailbox"],
      ["not found", "/no-such-page"],
      ["bench", `/effects/${world.effect.id}`],
    ];
    for (const [name, path] of pages) {
      await editor.page.goto(path);
      if (name === "bench") {
        await waitForTable(editor.page, 8);
        await expect.poll(() => editor.page.getByTestId("code-view").count()).toBe(1);
        // With every overlay on and a conflict-free edit in progress, too.
        for (const overlay of ["Pixel grid", "Pivot", "Error shading", "Ideal turn", "Wrapped and clipped", "Key pixels"])
          await editor.page.getByRole("checkbox", { name: overlay, exact: true }).check();
        await editor.page.getByLabel("List, one angle per line").check();
      }
      await check(editor.page, name);
    }
    await editor.context.close();

    const viewer = await signInAs(e2e.browser, world.viewer);
    await viewer.page.goto(`/effects/${world.effect.id}`);
    await waitForTable(viewer.page, 8);
    await check(viewer.page, "bench for a viewer");
    await screenshot(viewer.page, "bench-viewer-a11y");
    await viewer.context.close();

    if (problems.length > 0) console.error(`axe found:\n${problems.join("\n")}`);
    expect(problems).toEqual([]);
  });
});
