/**
 * Helpers of the team-sharing browser tests: the mail the app sent, read back from the local mail catcher that the
 * e2e setup starts (its SMTP server caught it; its HTTP side lists it), and signing in from wherever a link led.
 */
import type { Page } from "playwright-core";
import { expect, inject } from "vitest";
import type { CaughtMail } from "../../app/mail.server.ts";
import { appUrl } from "./support.ts";

/** Every message the catcher holds, newest first. */
export async function caughtMail(): Promise<CaughtMail[]> {
  const response = await fetch(`${inject("mailboxUrl")}/messages`);
  expect(response.status).toBe(200);
  return (await response.json()) as CaughtMail[];
}

/** The newest message to `to` whose subject matches, waiting for it to arrive. */
export async function waitForMail(to: string, subject: RegExp = /./): Promise<CaughtMail> {
  let found: CaughtMail | undefined;
  await expect
    .poll(async () => {
      found = (await caughtMail()).find((m) => m.to.includes(to) && subject.test(m.subject));
      return found !== undefined;
    })
    .toBe(true);
  return found!;
}

/** The invitation link in a message: the line that starts with the app's address and /invitations/. */
export function invitationLink(mail: CaughtMail): string {
  const line = mail.text.split("\n").find((l) => l.startsWith(`${appUrl()}/invitations/`));
  expect(line, mail.text).toBeDefined();
  return line!.trim();
}

/** Screenshots a page at 1280 and at 1024 pixels wide (full page), then puts the width back. */
export async function screenshotsAtTwoWidths(page: Page, name: string, shoot: (page: Page, name: string) => Promise<void>): Promise<void> {
  const size = page.viewportSize() ?? { width: 1280, height: 900 };
  for (const width of [1280, 1024]) {
    await page.setViewportSize({ width, height: 900 });
    await shoot(page, `${name}-${width}`);
  }
  await page.setViewportSize(size);
}
