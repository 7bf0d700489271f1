import { and, eq } from "drizzle-orm";
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createDb } from "../../app/db/client.server.ts";
import { projects, teams, users } from "../../app/db/schema.ts";
import { DEMO_TEAM, demoPerson } from "../../app/demo/people.ts";
import { listEffects } from "../../app/models/effects.server.ts";
import { getRole } from "../../app/models/teams.server.ts";
import { makeTeam, makeUser } from "../factories.ts";
import { launch, postForm, screenshot, signIn, signInAs } from "./support.ts";

const db = createDb(process.env.DATABASE_URL!, { max: 2 });
let browser: Browser;
let demo: { teamId: string; projectId: string };

beforeAll(async () => {
  browser = await launch();
  const [row] = await db
    .select({ teamId: teams.id, projectId: projects.id })
    .from(projects)
    .innerJoin(teams, eq(teams.id, projects.teamId))
    .where(and(eq(teams.slug, DEMO_TEAM.slug), eq(projects.name, "Lantern Quay")));
  demo = row;
});
afterAll(async () => {
  await browser?.close();
  await db.$client.end();
});

const userByLogin = async (login: string) => (await db.select().from(users).where(eq(users.login, login)))[0];

describe("a viewer", () => {
  it("reads the project but gets no edit controls", async () => {
    const { context, page } = await signIn(browser, demoPerson("viewer").login);
    await page.goto(`/projects/${demo.projectId}`);
    await expect.poll(() => page.getByTestId("effects-table").locator("tbody tr").count()).toBeGreaterThanOrEqual(2);
    for (const name of ["Create effect", "Archive project", "Duplicate", "Delete", "Save details"])
      expect(await page.getByRole("button", { name }).count(), name).toBe(0);
    expect(await page.getByText("Rename").count()).toBe(0);
    expect(await page.getByText("Edit name and description").count()).toBe(0);
    await screenshot(page, "project-viewer");

    await page.goto(`/teams/${demo.teamId}`);
    await page.getByTestId("members-summary").waitFor();
    expect(await page.getByRole("combobox").count()).toBe(0);
    for (const name of ["Create project", "Change", "Remove", "Save name"])
      expect(await page.getByRole("button", { name }).count(), name).toBe(0);

    // Reading is allowed: the effect page and the document download.
    const [effect] = await listEffects(db, demo.projectId);
    const download = await page.request.get(`/effects/${effect.id}/document.json`);
    expect(download.status()).toBe(200);
    expect(download.headers()["content-disposition"]).toMatch(/attachment; filename=".*\.effect\.json"/);
    await context.close();
  });

  it("gets a 403 when posting a change anyway, and nothing changes", async () => {
    const { context, page } = await signIn(browser, demoPerson("viewer").login);
    const before = (await listEffects(db, demo.projectId)).map((e) => e.name);
    const create = await postForm(page, `/projects/${demo.projectId}`, { intent: "create-effect", name: "Sneaky effect" });
    expect(create.status()).toBe(403);
    expect(await create.text()).toContain("Viewers can read but not change anything");
    const archive = await postForm(page, `/projects/${demo.projectId}`, { intent: "archive-project" });
    expect(archive.status()).toBe(403);
    const editor = await userByLogin(demoPerson("editor").login);
    const promote = await postForm(page, `/teams/${demo.teamId}/members`, { intent: "change-role", userId: editor.id, role: "viewer" });
    expect(promote.status()).toBe(403);
    expect((await listEffects(db, demo.projectId)).map((e) => e.name)).toEqual(before);
    expect(await getRole(db, demo.teamId, editor.id)).toBe("editor");
    await page.goto(`/projects/${demo.projectId}`);
    await expect.poll(() => page.getByTestId("effects-table").textContent()).not.toContain("Sneaky effect");
    await context.close();
  });
});

describe("an editor", () => {
  it("may edit effects but not manage members: no role controls, and 403 when trying", async () => {
    const { context, page } = await signIn(browser, demoPerson("editor").login);
    await page.goto(`/projects/${demo.projectId}`);
    await expect.poll(() => page.getByRole("button", { name: "Create effect" }).count()).toBe(1);
    await page.goto(`/teams/${demo.teamId}`);
    await page.getByTestId("members-summary").waitFor();
    expect(await page.getByRole("combobox").count()).toBe(0);
    expect(await page.getByRole("button", { name: "Create project" }).count()).toBe(1);
    const viewer = await userByLogin(demoPerson("viewer").login);
    const attempt = await postForm(page, `/teams/${demo.teamId}/members`, { intent: "change-role", userId: viewer.id, role: "owner" });
    expect(attempt.status()).toBe(403);
    expect(await attempt.text()).toContain("Only owners can do this; you are an editor in this team.");
    expect(await getRole(db, demo.teamId, viewer.id)).toBe("viewer");
    await context.close();
  });
});

describe("an owner", () => {
  it("changes roles and removes members, but cannot demote the team's last owner", async () => {
    // People and a team of the test's own: the demo stays as seeded, and the test can run again on this database.
    const owner = await makeUser(db);
    const member = await makeUser(db);
    const team = await makeTeam(db, { owner, name: `Pier Nine ${Date.now().toString(36)}`, members: [{ user: member, role: "viewer" }] });

    const { context, page } = await signInAs(browser, owner);
    await page.goto(`/teams/${team.id}/members`);
    const memberRow = page.getByTestId(`member-${member.login}`);
    await memberRow.getByRole("combobox").selectOption("editor");
    await memberRow.getByRole("button", { name: "Change" }).click();
    await expect.poll(() => getRole(db, team.id, member.id)).toBe("editor");
    await page.reload();
    await expect.poll(() => page.getByTestId(`member-${member.login}`).getByRole("combobox").inputValue()).toBe("editor");

    const ownRow = page.getByTestId(`member-${owner.login}`);
    await ownRow.getByRole("combobox").selectOption("viewer");
    await ownRow.getByRole("button", { name: "Change" }).click();
    await expect
      .poll(() => ownRow.getByRole("alert").textContent())
      .toBe("A team needs at least one owner: make someone else an owner first.");
    expect(await getRole(db, team.id, owner.id)).toBe("owner");
    // The refused change puts the menu back to the role the owner really has.
    await expect.poll(() => ownRow.getByRole("combobox").inputValue()).toBe("owner");
    await screenshot(page, "team-owner");

    await page
      .getByTestId(`member-${member.login}`)
      .getByRole("link", { name: /^Remove / })
      .click();
    await page
      .getByRole("dialog")
      .getByRole("button", { name: /^Remove / })
      .click();
    await expect.poll(() => page.getByTestId(`member-${member.login}`).count()).toBe(0);
    expect(await getRole(db, team.id, member.id)).toBeNull();
    await context.close();
  });
});
