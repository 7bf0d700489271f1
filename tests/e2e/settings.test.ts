/** The settings page: a person makes an API token, sees it once, uses it, and revokes it. */
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createDb } from "../../app/db/client.server.ts";
import { listApiTokens } from "../../app/models/apiTokens.server.ts";
import { makeTeam, makeUser } from "../factories.ts";
import { appUrl, launch, screenshot, signInAs } from "./support.ts";

const db = createDb(process.env.DATABASE_URL!, { max: 2 });
let browser: Browser;

beforeAll(async () => {
  browser = await launch();
});
afterAll(async () => {
  await browser?.close();
  await db.$client.end();
});

const teamsWith = (token: string) => fetch(`${appUrl()}/api/v1/teams`, { headers: { Authorization: `Bearer ${token}` } });

describe("API tokens on the settings page", () => {
  it("creates a token shown once, which then reads the API, and revokes it so it no longer does", async () => {
    const user = await makeUser(db);
    const team = await makeTeam(db, { owner: user, name: `Settings quay ${user.login.slice(-6)}` });
    const { context, page } = await signInAs(browser, user, { viewport: { width: 1280, height: 800 } });

    await page.getByRole("navigation", { name: "Account" }).getByRole("link", { name: "Settings" }).click();
    await page.getByRole("heading", { name: "Settings", level: 1 }).waitFor();
    await page.getByText("No tokens yet").waitFor();

    // A name the shared text rule refuses gets its field message, and no token is made.
    await page.getByLabel("Token name").fill("build\u202eserver");
    await page.getByRole("button", { name: "Create token" }).click();
    await expect.poll(() => page.getByRole("alert").first().textContent()).toContain("bidirectional");
    expect(await listApiTokens(db, user.id)).toEqual([]);

    await page.getByLabel("Token name").fill("build server");
    await page.getByLabel("Scope").selectOption("read");
    await page.getByLabel("Expires after").selectOption("30");
    await page.getByRole("button", { name: "Create token" }).click();
    const shown = page.getByTestId("new-token");
    await shown.waitFor();
    const secret = await page.getByLabel("New token").inputValue();
    expect(secret).toMatch(/^sks_[A-Za-z0-9_-]{43}$/);
    expect(await shown.textContent()).toContain("shown only this once");
    await screenshot(page, "settings-token-created-1280");

    // The row lists it with its scope, expiry in about 30 days, and no use yet.
    const row = page.getByTestId("token-build server");
    await expect.poll(() => row.textContent()).toContain("never");
    expect(await row.textContent()).toContain("read");
    const [stored] = await listApiTokens(db, user.id);
    expect(Math.round((stored.expiresAt!.getTime() - stored.createdAt.getTime()) / 86_400_000)).toBe(30);

    // The token works; its use shows on the page after a reload, and the secret is gone for good.
    const read = await teamsWith(secret);
    expect(read.status).toBe(200);
    expect((await read.json()).teams.map((t: { id: string }) => t.id)).toEqual([team.id]);
    await page.reload();
    await page.getByTestId("tokens-table").waitFor();
    expect(await page.getByTestId("new-token").count()).toBe(0);
    expect(await page.content()).not.toContain(secret);
    await expect.poll(() => page.getByTestId("token-build server").textContent()).not.toContain("never");

    await page.setViewportSize({ width: 1024, height: 800 });
    await screenshot(page, "settings-tokens-1024");

    // Revoking asks first; "Keep" changes nothing.
    await page.getByTestId("token-build server").getByRole("button", { name: "Revoke…" }).click();
    await page.getByRole("button", { name: "Keep" }).click();
    expect((await teamsWith(secret)).status).toBe(200);
    await page.getByTestId("token-build server").getByRole("button", { name: "Revoke…" }).click();
    await screenshot(page, "settings-revoke-confirm-1024");
    await page.getByRole("button", { name: "Revoke now" }).click();
    await expect.poll(() => page.getByTestId("token-build server").textContent()).toContain("revoked");
    expect(await page.getByTestId("token-build server").getByRole("button").count()).toBe(0);
    const refused = await teamsWith(secret);
    expect(refused.status).toBe(401);
    expect((await refused.json()).error.message).toContain("revoked");
    await screenshot(page, "settings-revoked-1024");
    await context.close();
  });

  it("shows the API reference to a signed-in person, with this server's address", async () => {
    const user = await makeUser(db);
    const { context, page } = await signInAs(browser, user, { viewport: { width: 1280, height: 800 } });
    await page.goto("/settings");
    await page.getByRole("link", { name: "API reference" }).click();
    await page.getByRole("heading", { name: "The Skewsmith API", level: 1 }).waitFor();
    expect(await page.getByLabel("This server").textContent()).toContain(`SKEWSMITH_URL=${appUrl()}`);
    expect(await page.locator("pre").count()).toBeGreaterThan(10);
    await screenshot(page, "api-reference-1280");
    await page.setViewportSize({ width: 1024, height: 800 });
    await screenshot(page, "api-reference-1024");
    await context.close();

    // Signed out, the reference sends a visitor to sign in first.
    const visitor = await fetch(`${appUrl()}/docs/api`, { redirect: "manual" });
    expect(visitor.status).toBe(302);
  });
});
