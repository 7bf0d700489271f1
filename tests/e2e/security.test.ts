/**
 * The page policy in a real browser: on every page, no script, style, font, image or form the app uses is blocked
 * by its Content-Security-Policy, and the app's scripts run (they hydrate and handle a form without a reload).
 */
import type { Page } from "playwright-core";
import { describe, expect, it } from "vitest";
import { makeEffect, makeProject, makeSprite, makeTeam, makeUser } from "../factories.ts";
import { screenshot, signInAs, browserAndDb } from "./support.ts";

const e2e = browserAndDb(1);
const { db } = e2e;

/** Collects every policy violation the page reports (an init script runs before the page's own). */
async function watchViolations(page: Page): Promise<() => Promise<string[]>> {
  const console: string[] = [];
  page.on("console", (m) => {
    if (/Content Security Policy|Refused to/i.test(m.text())) console.push(m.text());
  });
  await page.addInitScript(() => {
    const seen: string[] = [];
    (window as unknown as { __violations: string[] }).__violations = seen;
    document.addEventListener("securitypolicyviolation", (e) => seen.push(`${e.violatedDirective} ${e.blockedURI}`));
  });
  return async () => [...console, ...(await page.evaluate(() => (window as unknown as { __violations: string[] }).__violations ?? []))];
}

describe("the page policy in the browser", () => {
  it("blocks nothing the app itself uses, at 1280 and 1024 wide, and the app's scripts work", async () => {
    const owner = await makeUser(db);
    const team = await makeTeam(db, { owner });
    const project = await makeProject(db, { team, actor: owner });
    const sprite = await makeSprite(db, { project, actor: owner });
    const effect = await makeEffect(db, { project, actor: owner, name: "Policy beam", sprite });
    for (const width of [1280, 1024]) {
      const { context, page } = await signInAs(e2e.browser, owner, { viewport: { width, height: 900 } });
      const violations = await watchViolations(page);
      const pages = [
        "/",
        `/teams/${team.id}`,
        `/teams/${team.id}/members`,
        `/teams/${team.id}/profiles`,
        `/projects/${project.id}`,
        `/projects/${project.id}/sprites`,
        `/projects/${project.id}/activity`,
        `/effects/${effect.id}`,
        "/settings",
        "/docs/api",
        "/dev/mailbox",
      ];
      for (const path of pages) {
        await page.goto(path);
        await page.waitForLoadState("networkidle");
        expect(await violations(), `${path} at ${width}`).toEqual([]);
      }
      // The sprite image and the fonts came through the policy.
      await page.goto(`/projects/${project.id}/sprites`);
      await expect
        .poll(() =>
          page
            .locator("img")
            .first()
            .evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth),
        )
        .toBeGreaterThan(0);
      expect(await page.evaluate(() => document.fonts.check("16px Inter"))).toBe(true);
      // Scripts ran: a rename through the app's own fetch, no page load.
      await page.goto(`/projects/${project.id}`);
      const row = page.getByTestId("effect-row-Policy beam");
      await row.getByText("Rename").click();
      await row.getByLabel("New name").fill(`Policy beam ${width}`);
      const loads: string[] = [];
      page.on("framenavigated", (f) => loads.push(f.url()));
      await row.getByRole("button", { name: "Save name" }).click();
      await page.getByTestId(`effect-row-Policy beam ${width}`).waitFor();
      expect(loads).toEqual([]);
      expect(await violations()).toEqual([]);
      await screenshot(page, `policy-project-${width}`);
      // Back to the old name for the next width.
      const renamed = page.getByTestId(`effect-row-Policy beam ${width}`);
      await renamed.getByText("Rename").click();
      await renamed.getByLabel("New name").fill("Policy beam");
      await renamed.getByRole("button", { name: "Save name" }).click();
      await page.getByTestId("effect-row-Policy beam").waitFor();
      await context.close();
    }
  });

  it("shows a renamed-meanwhile effect's refusal in the form, and the reload shows the new name", async () => {
    const owner = await makeUser(db);
    const team = await makeTeam(db, { owner });
    const project = await makeProject(db, { team, actor: owner });
    await makeEffect(db, { project, actor: owner, name: "Shared beam" });
    const { context, page } = await signInAs(e2e.browser, owner);
    await page.goto(`/projects/${project.id}`);
    // Someone else renames it from another tab after this page was loaded.
    const other = await context.newPage();
    await other.goto(`/projects/${project.id}`);
    const theirs = other.getByTestId("effect-row-Shared beam");
    await theirs.getByText("Rename").click();
    await theirs.getByLabel("New name").fill("Their beam");
    await theirs.getByRole("button", { name: "Save name" }).click();
    await other.getByTestId("effect-row-Their beam").waitFor();
    // This page still shows the old version: its rename is refused, with what the effect is now.
    const mine = page.getByTestId("effect-row-Shared beam");
    await mine.getByText("Rename").click();
    await mine.getByLabel("New name").fill("My beam");
    await mine.getByRole("button", { name: "Save name" }).click();
    await expect
      .poll(() => mine.getByRole("alert").textContent())
      .toBe(
        "Someone changed this effect after you opened it (it is now “Their beam”, version 2; you started from version 1). Reload to see their change, then try again.",
      );
    await screenshot(page, "stale-rename");
    await page.reload();
    await page.getByTestId("effect-row-Their beam").waitFor();
    expect(await page.getByTestId("effect-row-My beam").count()).toBe(0);
    await context.close();
  });
});
