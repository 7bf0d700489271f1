/** Browser helpers for the end-to-end tests: Debian's Chromium through playwright-core, and sign-in via the stand-in. */
import { mkdirSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { chromium, type Browser, type BrowserContext, type Page } from "playwright-core";
import { afterAll, beforeAll, expect, inject } from "vitest";
import { createDb, type Db } from "../../app/db/client.server.ts";
import type { User } from "../../app/db/schema.ts";
import { DEMO_PEOPLE } from "../../app/demo/people.ts";

import { CHROMIUM, CHROMIUM_ARGS } from "./chromium.ts";

export { CHROMIUM, CHROMIUM_ARGS };

const SHOTS = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../../test-results/e2e");

export function appUrl(): string {
  return inject("appUrl");
}

/** Launches Chromium; playwright gives every launch a fresh, temporary --user-data-dir. */
export function launch(): Promise<Browser> {
  return chromium.launch({ executablePath: CHROMIUM, args: CHROMIUM_ARGS, headless: true });
}

/** A new browser context (its own cookies) with a page on the app. */
/**
 * Chromium and a connection to the test database for one test file: opened before its first test, both closed after
 * its last. Read `browser` inside the tests (it is set once the file's set-up has run).
 */
export function browserAndDb(poolSize = 2): { readonly db: Db; readonly browser: Browser } {
  const db = createDb(process.env.DATABASE_URL!, { max: poolSize });
  let browser: Browser | undefined;
  beforeAll(async () => {
    browser = await launch();
  });
  afterAll(async () => {
    await browser?.close();
    await db.$client.end();
  });
  return {
    db,
    get browser() {
      if (!browser) throw new Error("the browser is opened in beforeAll: read it inside a test");
      return browser;
    },
  };
}

export async function openPage(
  browser: Browser,
  viewport: { width: number; height: number } = { width: 1280, height: 900 },
): Promise<{ context: BrowserContext; page: Page }> {
  const context = await browser.newContext({ baseURL: appUrl(), viewport });
  const page = await context.newPage();
  return { context, page };
}

/** Signs in as a demo account the way a person does: the app's button, then the stand-in's account chooser. */
export async function signIn(
  browser: Browser,
  login: string,
  options: { viewport?: { width: number; height: number } } = {},
): Promise<{ context: BrowserContext; page: Page }> {
  const person = DEMO_PEOPLE.find((p) => p.login === login);
  if (!person) throw new Error(`no demo account ${login}`);
  return chooseAccount(browser, login, options);
}

/**
 * Signs in as a person the test made itself (tests/factories.ts makeUser): the stand-in learns the account first,
 * then the sign-in goes as for a demo account. Tests that change things use their own people and teams, so the
 * suite can run twice on one database and in any order.
 */
export async function signInAs(
  browser: Browser,
  user: Pick<User, "githubId" | "login" | "name" | "email">,
  options: { viewport?: { width: number; height: number } } = {},
): Promise<{ context: BrowserContext; page: Page }> {
  await registerAccount(user);
  return chooseAccount(browser, user.login, options);
}

/** Tells the GitHub stand-in about a person the test made, so its account chooser offers them. */
export async function registerAccount(user: Pick<User, "githubId" | "login" | "name" | "email">): Promise<void> {
  const added = await fetch(`${inject("githubUrl")}/_accounts`, {
    method: "POST",
    headers: { "Content-Type": "application/json" },
    body: JSON.stringify({ githubId: user.githubId, login: user.login, name: user.name, email: user.email }),
  });
  if (added.status !== 201) throw new Error(`the GitHub stand-in refused the test account ${user.login}: ${await added.text()}`);
}

/** On the sign-in page the app sent `page` to: signs in as `login` through the stand-in's chooser, and waits to be signed in. */
export async function signInFromHere(page: Page, login: string): Promise<void> {
  await expect.poll(() => new URL(page.url()).pathname).toBe("/sign-in");
  await page.getByRole("button", { name: "Sign in with GitHub" }).click();
  await page.getByRole("heading", { name: /Sign in to Skewsmith as/ }).waitFor();
  await page.getByRole("button", { name: new RegExp(`@${login}(\\s|$)`) }).click();
  await expect.poll(() => page.getByTestId("signed-in-as").textContent()).toContain(`@${login}`);
}

async function chooseAccount(
  browser: Browser,
  login: string,
  options: { viewport?: { width: number; height: number } },
): Promise<{ context: BrowserContext; page: Page }> {
  const { context, page } = await openPage(browser, options.viewport);
  await page.goto("/");
  await signInFromHere(page, login);
  await page.waitForURL(`${appUrl()}/`);
  return { context, page };
}

/** Saves a full-page screenshot under test-results/e2e (ignored by git) for a person to look at. */
export async function screenshot(page: Page, name: string): Promise<void> {
  mkdirSync(SHOTS, { recursive: true });
  await page.screenshot({ path: path.join(SHOTS, `${name}.png`), fullPage: true });
}

/** The cookies of a context as one Cookie header. */
export async function cookieHeader(context: BrowserContext): Promise<string> {
  return (await context.cookies()).map((c) => `${c.name}=${c.value}`).join("; ");
}

/**
 * Posts a form with this page's cookies, from this app's own origin as the page's own forms do: the app refuses a
 * state-changing request that does not say it comes from its own pages (Origin), and playwright's request API
 * sends no Origin by itself.
 */
export function postForm(page: Page, url: string, form: Record<string, string>) {
  return page.request.post(url, { form, headers: { Origin: new URL(appUrl()).origin } });
}

/** The Origin header the app's own pages send with a post (for playwright's request API, which sends none). */
export function sameOrigin(): { Origin: string } {
  return { Origin: new URL(appUrl()).origin };
}
