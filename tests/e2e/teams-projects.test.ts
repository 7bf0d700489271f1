import type { Page } from "playwright-core";
import { describe, expect, it } from "vitest";
import { makeUser } from "../factories.ts";
import { postForm, screenshot, signInAs, browserAndDb } from "./support.ts";

const e2e = browserAndDb(1);
const { db } = e2e;

const tag = Date.now().toString(36);
const row = (page: Page, name: string) => page.getByTestId(`effect-row-${name}`);

describe("a person with no team", () => {
  it("creates a team and a project, and works with effects in it", async () => {
    // A person of the test's own, in no team yet, so the test can run again on the same database.
    const newcomer = await makeUser(db);
    const { context, page } = await signInAs(e2e.browser, newcomer);

    // Home, team-less: the empty state says what to do next.
    await expect.poll(() => page.getByText("You are not in a team yet.").count()).toBe(1);
    await screenshot(page, "home-newcomer");

    // A name of spaces: the form's zod schema explains in the browser…
    await page.getByLabel("Team name").first().fill("   ");
    await page.getByRole("button", { name: "Create team" }).first().click();
    await expect.poll(() => page.getByRole("alert").first().textContent()).toBe("Give the team a name.");
    // …and the action, checking the same schema, answers 400 with the field message when posted anyway.
    const posted = await postForm(page, "/teams/new", { intent: "create-team", name: "   " });
    expect(posted.status()).toBe(400);
    expect(await posted.text()).toContain("Give the team a name.");

    const teamName = `Breakwater Crew ${tag}`;
    await page.getByLabel("Team name").first().fill(teamName);
    await page.getByRole("button", { name: "Create team" }).first().click();
    await page.waitForURL(/\/teams\/[0-9a-f-]{36}$/);
    await expect.poll(() => page.getByRole("heading", { level: 1 }).textContent()).toBe(teamName);
    await expect.poll(() => page.getByText("No projects yet").count()).toBe(1);
    await expect.poll(() => page.getByTestId("members-summary").textContent()).toContain("owner");

    // A shared target profile: core refuses a fraction as wide as the word, then the fixed one is listed.
    const teamUrl = page.url();
    await page.getByRole("link", { name: "Manage target profiles" }).click();
    await page.getByRole("link", { name: "New target profile" }).click();
    await page.getByLabel("Profile name").fill("Wide screen");
    await page.getByLabel("Canvas width").fill("256");
    await page.getByLabel("Canvas height").fill("224");
    await page.getByLabel("Bits", { exact: true }).selectOption("8");
    await page.getByLabel("Fraction bits").fill("8");
    await page.getByRole("button", { name: "Create target profile" }).click();
    await expect
      .poll(() => page.getByRole("alert").first().textContent())
      .toBe("Fraction bits: 8 is not allowed; allowed a whole number from 0 to 7 (below bits = 8)");
    await page.getByLabel("Fraction bits").fill("7");
    await page.getByRole("button", { name: "Create target profile" }).click();
    await expect.poll(() => page.getByRole("heading", { level: 1 }).textContent()).toBe("Wide screen");
    await page.goto(teamUrl);
    await expect.poll(() => page.getByTestId("profiles-table").textContent()).toMatch(/Wide screen.*256 × 224.*Q1\.7/);

    // Projects: validation message, then a real one.
    await page.getByLabel("New project name").fill(" ");
    await page.getByRole("button", { name: "Create project" }).click();
    await expect.poll(() => page.getByRole("alert").first().textContent()).toBe("Give the project a name.");
    const longName = await postForm(page, page.url(), { intent: "create-project", name: "x".repeat(81) });
    expect(longName.status()).toBe(400);
    expect(await longName.text()).toContain("Keep the project name to 80 characters or fewer.");
    await page.getByLabel("New project name").fill("Title screen");
    await page.getByLabel("Description (optional)", { exact: true }).fill("The spinning logo before the game starts.");
    await page.getByRole("button", { name: "Create project" }).click();
    await page.waitForURL(/\/projects\/[0-9a-f-]{36}$/);
    const projectUrl = page.url();
    await expect.poll(() => page.getByText("No effects in this project yet").count()).toBe(1);

    // Effects: create with the spec's defaults, rename, duplicate, delete and restore.
    await page.getByLabel("New effect name").fill("Lighthouse beam");
    await page.getByRole("button", { name: "Create effect" }).click();
    await expect.poll(() => row(page, "Lighthouse beam").textContent()).toMatch(/64 × 64.*Q8\.8.*own settings.*v1/);
    await expect.poll(() => row(page, "Lighthouse beam").textContent()).toContain("sweep 0° → 360°, 64 frames");

    await page.getByLabel("New effect name").fill("Harbour tilt");
    await page.getByLabel("Target profile", { exact: true }).selectOption({ label: "Wide screen (256 × 224, Q1.7)" });
    await page.getByRole("button", { name: "Create effect" }).click();
    await expect.poll(() => row(page, "Harbour tilt").textContent()).toMatch(/256 × 224.*Q1\.7.*Wide screen/);

    await page.getByLabel("New effect name").fill("lighthouse BEAM");
    await page.getByRole("button", { name: "Create effect" }).click();
    await expect.poll(() => page.getByRole("alert").first().textContent()).toContain("already has an effect called “lighthouse BEAM”");

    await row(page, "Lighthouse beam").getByText("Rename").click();
    await row(page, "Lighthouse beam").getByLabel("New name").fill("Lighthouse sweep");
    await row(page, "Lighthouse beam").getByRole("button", { name: "Save name" }).click();
    await row(page, "Lighthouse sweep").waitFor();

    await row(page, "Lighthouse sweep").getByRole("button", { name: "Duplicate" }).click();
    await row(page, "Lighthouse sweep copy").waitFor();
    await row(page, "Lighthouse sweep copy").getByRole("button", { name: "Delete" }).click();
    await expect.poll(() => row(page, "Lighthouse sweep copy").count()).toBe(0);
    await page.getByText("Recently deleted").click();
    await page.getByRole("button", { name: "Restore", exact: true }).click();
    await row(page, "Lighthouse sweep copy").waitFor();
    await screenshot(page, "project-newcomer");

    // The effect's bench shows its settings and measures its 64 frames; the document download is the validated one.
    await row(page, "Lighthouse sweep").getByRole("link", { name: "Lighthouse sweep" }).click();
    await page.waitForURL(/\/effects\/[0-9a-f-]{36}(\?.*)?$/);
    await expect.poll(() => page.getByTestId("frame-table").locator("tbody tr").count()).toBe(64);
    expect([await page.getByLabel("Width", { exact: true }).inputValue(), await page.getByLabel("Pivot x").inputValue()]).toEqual([
      "64",
      "32",
    ]);
    const download = await page.request.get(`${new URL(page.url()).pathname}/document.json`);
    expect(await download.json()).toMatchObject({
      format: "skewsmith.effect/1",
      canvas: { width: 64, height: 64 },
      pivot: { x: 32, y: 32 },
      columnGroup: 1,
    });
    await screenshot(page, "effect-newcomer");

    // Describe, archive and restore the project.
    await page.goto(projectUrl);
    await page.getByText("Edit name and description").click();
    await page.getByLabel("Name", { exact: true }).fill("Title screen logo");
    await page.getByRole("button", { name: "Save details" }).click();
    await expect.poll(() => page.getByRole("heading", { level: 1 }).textContent()).toBe("Title screen logo");
    await page.getByRole("button", { name: "Archive project" }).click();
    await expect.poll(() => page.getByText("This project is archived").count()).toBe(1);
    await expect.poll(() => page.getByRole("button", { name: "Create effect" }).count()).toBe(0);
    await page.getByRole("button", { name: "Restore project" }).click();
    await expect.poll(() => page.getByRole("button", { name: "Create effect" }).count()).toBe(1);

    // The team's project table shows the project with its effect count, and sorts.
    await page.getByRole("navigation", { name: "Breadcrumb" }).getByRole("link", { name: teamName }).click();
    await page.waitForURL(/\/teams\//);
    await page.getByLabel("New project name").fill("Aaa empty");
    await page.getByRole("button", { name: "Create project" }).click();
    await page.waitForURL(/\/projects\//);
    await page.goBack();
    await page.reload();
    const names = () => page.getByTestId("projects-table").locator("tbody tr td:first-child a").allTextContents();
    await expect.poll(names).toEqual(["Aaa empty", "Title screen logo"]);
    await page.getByRole("link", { name: /^Effects/ }).click();
    await expect.poll(() => page.url()).toContain("sort=effects&dir=asc");
    await page.getByRole("link", { name: /^Effects/ }).click();
    await expect.poll(() => page.url()).toContain("sort=effects&dir=desc");
    await expect.poll(names).toEqual(["Title screen logo", "Aaa empty"]);
    const counts = await page.getByTestId("projects-table").locator("tbody tr td:nth-child(2)").allTextContents();
    expect(counts).toEqual(["3", "0"]);
    await screenshot(page, "team-newcomer");
    await context.close();
  });
});
