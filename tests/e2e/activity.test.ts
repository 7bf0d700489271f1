import { describe, expect, it } from "vitest";
import { renameEffect } from "../../app/models/effects.server.ts";
import { makeEffect, makeProject, makeTargetProfile, makeTeam, makeUser, unique } from "../factories.ts";
import { appUrl, screenshot, signInAs, browserAndDb } from "./support.ts";
import { screenshotsAtTwoWidths } from "./teamSupport.ts";

const e2e = browserAndDb();
const { db } = e2e;

describe("a project's activity", () => {
  it("lists who changed what, newest first, in pages, narrowed by kind; bad page numbers are a 400", async () => {
    const owner = await makeUser(db, { name: `Nell Owner ${unique()}` });
    const viewer = await makeUser(db);
    const outsider = await makeUser(db);
    const team = await makeTeam(db, { owner, name: `Tide Table ${unique()}`, members: [{ user: viewer, role: "viewer" }] });
    const project = await makeProject(db, { team, actor: owner, name: "Lighthouse" });
    const effect = await makeEffect(db, { project, actor: owner, name: "Beam 0" });
    for (let i = 1; i <= 30; i++) await renameEffect(db, { effectId: effect.id, name: `Beam ${i}`, expectedVersion: i, actorId: owner.id });
    await makeTargetProfile(db, { team, actor: owner, name: "Lamp room" });
    // team.created, member.added, project.created, effect.created, 30 renames, target_profile.created
    const total = 35;

    const { context, page } = await signInAs(e2e.browser, viewer);
    await page.goto(`/projects/${project.id}`);
    await page.getByRole("link", { name: `All activity (${total})` }).click();
    await page.waitForURL(`${appUrl()}/projects/${project.id}/activity`);
    const items = () =>
      page
        .getByRole("region", { name: /changes?$/ })
        .locator("ol li")
        .allTextContents();
    await expect.poll(async () => (await items()).length).toBe(25);
    expect((await items())[0]).toContain("created the target profile Lamp room");
    expect((await items())[1]).toContain(`${owner.name} renamed the effect Beam 29 to Beam 30`);
    await expect.poll(() => page.getByTestId("activity-page").textContent()).toBe("Page 1 of 2");
    await screenshotsAtTwoWidths(page, "activity-page1", screenshot);
    await page.getByRole("link", { name: "Older →" }).click();
    await page.waitForURL(`${appUrl()}/projects/${project.id}/activity?page=2`);
    await expect.poll(async () => (await items()).length).toBe(total - 25);
    expect((await items()).at(-1)).toContain("created the team");
    await screenshotsAtTwoWidths(page, "activity-page2", screenshot);

    await page.getByRole("link", { name: "Target profiles" }).click();
    await page.waitForURL(`${appUrl()}/projects/${project.id}/activity?what=profiles`);
    await expect.poll(() => items()).toEqual([expect.stringContaining("created the target profile Lamp room")]);

    for (const bad of ["0", "-1", "abc", "1.5", "1e3", "9999999", "3", "%00", ""]) {
      const response = await page.request.get(`/projects/${project.id}/activity?page=${encodeURIComponent(bad)}`);
      expect(response.status(), `page=${bad}`).toBe(400);
      expect(await response.text()).toMatch(/page must be (a whole number from 1 up|from 1 to 2)/);
    }
    for (const bad of ["__proto__", "constructor", "toString", "hasOwnProperty", "effects.", "nope"]) {
      const response = await page.request.get(`/projects/${project.id}/activity?what=${encodeURIComponent(bad)}`);
      expect(response.status(), `what=${bad}`).toBe(400);
      expect(await response.text()).toContain("what must be one of effects, sprites, profiles, members, invitations, tokens, projects");
    }
    await context.close();

    const asOutsider = await signInAs(e2e.browser, outsider);
    expect((await asOutsider.page.goto(`/projects/${project.id}/activity`))?.status()).toBe(404);
    await asOutsider.context.close();
  });
});
