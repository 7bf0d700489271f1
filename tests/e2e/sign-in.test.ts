import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createDb } from "../../app/db/client.server.ts";
import { demoPerson } from "../../app/demo/people.ts";
import { makeTeam, makeUser } from "../factories.ts";
import { appUrl, cookieHeader, launch, openPage, screenshot, signIn, signInAs } from "./support.ts";

let browser: Browser;
beforeAll(async () => {
  browser = await launch();
});
afterAll(() => browser?.close());

describe.each(["owner", "editor", "viewer"] as const)("signing in as the demo %s", (role) => {
  it("goes through the stand-in's account chooser, lands home with the role shown, and signs out for good", async () => {
    const person = demoPerson(role);
    const { context, page } = await signIn(browser, person.login);
    const team = page.getByRole("link", { name: /Tidewell Games/ }).first();
    await expect.poll(() => team.textContent()).toContain(role);
    await expect.poll(() => page.getByRole("link", { name: "Lantern Quay" }).count()).toBe(1);
    await screenshot(page, `home-${role}`);

    const before = await cookieHeader(context);
    await page.getByRole("button", { name: "Sign out" }).click();
    await page.waitForURL(/\/sign-in\?signed-out/);
    await expect.poll(() => page.getByText("You are signed out").count()).toBe(1);

    // The old cookie no longer opens a session: it was ended on the server, not just cleared in the browser.
    const replay = await fetch(`${appUrl()}/`, { headers: { Cookie: before }, redirect: "manual" });
    expect(replay.status).toBe(302);
    expect(replay.headers.get("Location")).toMatch(/^\/sign-in/);
    await page.goto("/");
    await expect.poll(() => new URL(page.url()).pathname).toBe("/sign-in");
    await context.close();
  });
});

describe("sign-in", () => {
  it("brings a person back to the page they asked for", async () => {
    const { context, page } = await openPage(browser);
    await page.goto("/dev/mailbox");
    await expect.poll(() => page.url()).toContain("/sign-in?next=%2Fdev%2Fmailbox");
    await screenshot(page, "sign-in");
    await page.getByRole("button", { name: "Sign in with GitHub" }).click();
    await page.getByRole("button", { name: /@oren-saltmarsh/ }).click();
    await page.waitForURL(`${appUrl()}/dev/mailbox`);
    await expect.poll(() => page.getByRole("heading", { name: "Mailbox" }).count()).toBe(1);
    await context.close();
  });

  it("explains a sign-in cancelled at the provider", async () => {
    const { context, page } = await openPage(browser);
    await page.goto("/sign-in");
    await page.getByRole("button", { name: "Sign in with GitHub" }).click();
    await page.getByRole("button", { name: "Cancel and go back" }).click();
    await page.waitForURL(/\/sign-in\?error=denied/);
    await expect.poll(() => page.getByRole("alert").textContent()).toContain("Signing in was cancelled at GitHub");
    await context.close();
  });

  it("refuses a callback that did not start in this browser (the OAuth state check)", async () => {
    const { context, page } = await openPage(browser);
    await page.goto("/sign-in");
    await page.getByRole("button", { name: "Sign in with GitHub" }).click();
    await page.getByRole("heading", { name: /Sign in to Skewsmith as/ }).waitFor();
    // Someone else's browser receives the callback meant for this one (a login-CSRF attempt).
    const chooser = new URL(page.url());
    const choice = await fetch(`${chooser.origin}/login/oauth/authorize`, {
      method: "POST",
      body: new URLSearchParams({
        client_id: chooser.searchParams.get("client_id")!,
        redirect_uri: chooser.searchParams.get("redirect_uri")!,
        state: chooser.searchParams.get("state")!,
        login: demoPerson("owner").login,
      }),
      redirect: "manual",
    });
    const callback = choice.headers.get("Location")!;
    const other = await openPage(browser);
    await other.page.goto(callback);
    await other.page.waitForURL(/\/sign-in\?error=state/);
    await expect.poll(() => other.page.getByRole("alert").textContent()).toContain("its state check failed");
    await other.page.goto("/");
    await expect.poll(() => new URL(other.page.url()).pathname).toBe("/sign-in");
    await other.context.close();
    await context.close();
  });
});

describe("a person a test made itself", () => {
  it("signs in through the stand-in like a demo account and sees only their own team", async () => {
    const db = createDb(process.env.DATABASE_URL!, { max: 1 });
    try {
      const user = await makeUser(db);
      const team = await makeTeam(db, { owner: user });
      const { context, page } = await signInAs(browser, user);
      await expect.poll(() => page.getByRole("link", { name: new RegExp(team.name) }).count()).toBe(1);
      expect(await page.getByRole("link", { name: /Tidewell Games/ }).count()).toBe(0);
      await context.close();
    } finally {
      await db.$client.end();
    }
  });
});
