import { eq } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { invitations } from "../../app/db/schema.ts";
import { addMember, getRole } from "../../app/models/teams.server.ts";
import { REFUSED_DOMAIN } from "../../scripts/fakes/mail.ts";
import { makeTeam, makeUser, unique } from "../factories.ts";
import { appUrl, openPage, registerAccount, screenshot, signInAs, signInFromHere, sameOrigin, browserAndDb } from "./support.ts";
import { invitationLink, screenshotsAtTwoWidths, waitForMail } from "./teamSupport.ts";

const e2e = browserAndDb();
const { db } = e2e;

const address = (what: string) => `${what}-${unique()}@example.test`;

describe("an invitation by e-mail", () => {
  it("reaches the invitee over SMTP, and its link, opened by a second person who signs in, adds them with the role", async () => {
    const owner = await makeUser(db, { name: `Ilse Owner ${unique()}` });
    const team = await makeTeam(db, { owner, name: `Mooring Crew ${unique()}` });
    const invited = address("invitee");

    const { context, page } = await signInAs(e2e.browser, owner);
    await page.goto(`/teams/${team.id}`);
    await page.getByRole("link", { name: "Invite and manage members" }).click();
    await page.waitForURL(`${appUrl()}/teams/${team.id}/members`);
    await page.getByLabel("E-mail address").fill(invited);
    await page.getByLabel("Role", { exact: true }).selectOption("editor");
    await page.getByRole("button", { name: "Send invitation" }).click();
    await expect.poll(() => page.getByTestId("members-result").textContent()).toContain(`Invited ${invited} as an editor.`);
    await expect.poll(() => page.getByTestId("members-result").textContent()).toContain(`The link went to ${invited}`);
    await expect.poll(() => page.getByTestId(`invitation-${invited}`).textContent()).toMatch(/editor.*UTC.*until/);
    await screenshotsAtTwoWidths(page, "members-owner", screenshot);

    // The message as the SMTP catcher parsed it.
    const mail = await waitForMail(invited, /invited you to the team/);
    expect(mail.subject).toBe(`${owner.name} invited you to the team ${team.name} on Skewsmith`);
    expect(mail.text).toContain("the link works once, until");
    const link = invitationLink(mail);

    // A second person, with another address, not signed in: the link goes to sign-in and back to the invitation.
    const joiner = await makeUser(db, { name: `Pell Joiner ${unique()}`, email: address("joiner") });
    await registerAccount(joiner);
    const second = await openPage(e2e.browser);
    await second.page.goto(link);
    await signInFromHere(second.page, joiner.login);
    await second.page.waitForURL(link);
    await expect.poll(() => second.page.getByRole("heading", { level: 1 }).textContent()).toBe(`Join ${team.name}`);
    const accepting = second.page.getByTestId("accepting-as");
    await expect.poll(() => accepting.textContent()).toContain(`@${joiner.login}`);
    await expect.poll(() => accepting.textContent()).toContain("This account's address is not the invited one.");
    expect(await second.page.locator("main").textContent()).toContain(invited);
    await screenshotsAtTwoWidths(second.page, "invitation-pending", screenshot);

    await second.page.getByRole("button", { name: `Join ${team.name} as an editor` }).click();
    await second.page.waitForURL(`${appUrl()}/teams/${team.id}`);
    await expect.poll(() => second.page.getByTestId("members-summary").textContent()).toContain(joiner.name!);
    expect(await getRole(db, team.id, joiner.id)).toBe("editor");

    // Used once: the same link now has a page of its own, with 410 Gone.
    const again = await second.page.goto(link);
    expect(again?.status()).toBe(410);
    await expect.poll(() => second.page.getByRole("heading", { level: 1 }).textContent()).toBe("This invitation was already used");
    expect(await second.page.locator("main").textContent()).toContain("(by you)");
    await screenshotsAtTwoWidths(second.page, "invitation-used", screenshot);
    await second.context.close();

    await page.reload();
    await expect.poll(() => page.getByTestId(`invitation-${invited}`).count()).toBe(0);
    await expect.poll(() => page.getByTestId(`member-${joiner.login}`).textContent()).toContain("editor");
    await context.close();
  });

  it("resend makes a new link (the old one stops working); revoke and expiry each get a clear page", async () => {
    const owner = await makeUser(db);
    const team = await makeTeam(db, { owner, name: `Slipway ${unique()}` });
    const invited = address("resent");
    const { context, page } = await signInAs(e2e.browser, owner);
    await page.goto(`/teams/${team.id}/members`);
    await page.getByLabel("E-mail address").fill(invited);
    await page.getByRole("button", { name: "Send invitation" }).click();
    const firstLink = invitationLink(await waitForMail(invited));

    await page.getByRole("button", { name: `Resend the invitation to ${invited}` }).click();
    await expect.poll(() => page.getByTestId("members-result").textContent()).toContain("the earlier one no longer works");
    let secondLink = firstLink;
    await expect.poll(async () => (secondLink = invitationLink(await waitForMail(invited)))).not.toBe(firstLink);

    const visitor = await openPage(e2e.browser);
    const old = await visitor.page.goto(firstLink);
    expect(old?.status()).toBe(404);
    await expect.poll(() => visitor.page.getByRole("heading", { level: 1 }).textContent()).toBe("This invitation link is not valid");
    expect(await visitor.page.locator("main").textContent()).toContain("only the link in the newest e-mail works");
    await screenshotsAtTwoWidths(visitor.page, "invitation-unknown", screenshot);
    // The new link is usable: it asks to sign in first.
    await visitor.page.goto(secondLink);
    await expect.poll(() => new URL(visitor.page.url()).pathname).toBe("/sign-in");

    await page.getByRole("button", { name: `Revoke the invitation to ${invited}` }).click();
    await expect.poll(() => page.getByTestId("members-result").textContent()).toContain(`Revoked the invitation to ${invited}`);
    await expect.poll(() => page.getByTestId(`invitation-${invited}`).count()).toBe(0);
    const revoked = await visitor.page.goto(secondLink);
    expect(revoked?.status()).toBe(410);
    await expect.poll(() => visitor.page.getByRole("heading", { level: 1 }).textContent()).toBe("This invitation was revoked");
    await screenshotsAtTwoWidths(visitor.page, "invitation-revoked", screenshot);

    const late = address("late");
    await page.getByLabel("E-mail address").fill(late);
    await page.getByRole("button", { name: "Send invitation" }).click();
    const lateLink = invitationLink(await waitForMail(late));
    await db
      .update(invitations)
      .set({ expiresAt: new Date(Date.now() - 60_000) })
      .where(eq(invitations.email, late));
    await page.reload();
    await expect.poll(() => page.getByTestId(`invitation-${late}`).textContent()).toContain("expired");
    const expired = await visitor.page.goto(lateLink);
    expect(expired?.status()).toBe(410);
    await expect.poll(() => visitor.page.getByRole("heading", { level: 1 }).textContent()).toBe("This invitation has expired");
    await screenshotsAtTwoWidths(visitor.page, "invitation-expired", screenshot);
    await visitor.context.close();
    await context.close();
  });

  it("says so when the mail cannot be sent, keeps the invitation and offers to resend it", async () => {
    const owner = await makeUser(db);
    const team = await makeTeam(db, { owner, name: `Breakwater ${unique()}` });
    const refused = `nobody-${unique()}@${REFUSED_DOMAIN}`;
    const { context, page } = await signInAs(e2e.browser, owner);
    await page.goto(`/teams/${team.id}/members`);
    await page.getByLabel("E-mail address").fill(refused);
    await page.getByRole("button", { name: "Send invitation" }).click();
    const result = page.getByTestId("members-result");
    await expect.poll(() => result.textContent()).toContain(`Invited ${refused} as an editor.`);
    await expect
      .poll(() => result.getByRole("alert").textContent())
      .toMatch(
        new RegExp(`The e-mail to ${refused.replace(/\./g, "\\.")} could not be sent \\(550 .*\\)\\. The invitation is kept: use Resend`),
      );
    const row = page.getByTestId(`invitation-${refused}`);
    await expect.poll(() => row.textContent()).toContain("not sent: the mail failed");
    await screenshotsAtTwoWidths(page, "members-mail-failed", screenshot);
    await row.getByRole("button", { name: `Resend the invitation to ${refused}` }).click();
    await expect.poll(() => result.getByRole("alert").textContent()).toContain("could not be sent");
    expect((await db.select().from(invitations).where(eq(invitations.email, refused))).map((i) => i.lastSentAt)).toEqual([null]);

    // A bad address never reaches the mailer: a field message.
    await page.getByLabel("E-mail address").fill("not an address");
    await page.getByRole("button", { name: "Send invitation" }).click();
    await expect.poll(() => page.getByText("That is not an e-mail address (say, name@example.com).").count()).toBe(1);
    await context.close();
  });
});

describe("owners managing members", () => {
  it("mail a member whose role changed; removal asks first, in a dialog and, without JavaScript, on a page", async () => {
    const owner = await makeUser(db, { name: `Rhea Owner ${unique()}` });
    const first = await makeUser(db, { name: `Ada Member ${unique()}`, email: address("first") });
    const second = await makeUser(db, { name: `Bo Member ${unique()}`, email: address("second") });
    const team = await makeTeam(db, {
      owner,
      name: `Dry Dock ${unique()}`,
      members: [
        { user: first, role: "viewer" },
        { user: second, role: "viewer" },
      ],
    });
    const { context, page } = await signInAs(e2e.browser, owner);
    await page.goto(`/teams/${team.id}/members`);
    const row = page.getByTestId(`member-${first.login}`);
    await row.getByRole("combobox").selectOption("editor");
    await row.getByRole("button", { name: "Change" }).click();
    await expect
      .poll(() => page.getByTestId("members-result").textContent())
      .toContain(`Made ${first.name} an editor (was viewer). They were told by e-mail at ${first.email}.`);
    const roleMail = await waitForMail(first.email!, /Your role in/);
    expect(roleMail.subject).toBe(`Your role in ${team.name} is now editor`);
    expect(roleMail.text).toContain(`${owner.name} changed your role in the team ${team.name} on Skewsmith from viewer to editor.`);
    expect(await getRole(db, team.id, first.id)).toBe("editor");

    // The dialog: it opens with the focus on Cancel, Escape closes it and nothing happens.
    await row.getByRole("link", { name: `Remove ${first.name}` }).click();
    const dialog = page.getByRole("dialog", { name: `Remove ${first.name} from ${team.name}?` });
    await dialog.waitFor();
    await expect.poll(() => page.evaluate(() => document.activeElement?.textContent)).toBe("Cancel");
    expect(await dialog.textContent()).toContain(`They are told by e-mail at ${first.email}`);
    await screenshotsAtTwoWidths(page, "members-remove-dialog", screenshot);
    await page.keyboard.press("Escape");
    await expect.poll(() => dialog.isVisible()).toBe(false);
    expect(await getRole(db, team.id, first.id)).toBe("editor");
    await row.getByRole("link", { name: `Remove ${first.name}` }).click();
    await dialog.getByRole("button", { name: `Remove ${first.name}` }).click();
    await expect
      .poll(() => page.getByTestId("members-result").textContent())
      .toContain(`Removed ${first.name} from ${team.name}. They were told by e-mail at ${first.email}.`);
    await expect.poll(() => getRole(db, team.id, first.id)).toBeNull();
    const removalMail = await waitForMail(first.email!, /You were removed/);
    expect(removalMail.text).toContain(`${owner.name} removed you from the team ${team.name} on Skewsmith, where you were an editor.`);

    // Without JavaScript the Remove link opens a page that asks the same question.
    const noScript = await e2e.browser.newContext({
      baseURL: appUrl(),
      javaScriptEnabled: false,
      viewport: { width: 1280, height: 900 },
      storageState: await context.storageState(),
    });
    const plain = await noScript.newPage();
    await plain.goto(`/teams/${team.id}/members`);
    await plain
      .getByTestId(`member-${second.login}`)
      .getByRole("link", { name: `Remove ${second.name}` })
      .click();
    await plain.waitForURL(`${appUrl()}/teams/${team.id}/members/${second.id}/remove`);
    await expect.poll(() => plain.getByRole("heading", { level: 1 }).textContent()).toBe(`Remove ${second.name} from ${team.name}?`);
    await screenshotsAtTwoWidths(plain, "members-remove-page", screenshot);
    await plain.getByRole("button", { name: `Remove ${second.name}` }).click();
    await plain.waitForURL(`${appUrl()}/teams/${team.id}/members`);
    await expect.poll(() => plain.getByTestId("members-result").textContent()).toContain(`Removed ${second.name}`);
    expect(await getRole(db, team.id, second.id)).toBeNull();
    await noScript.close();

    // A removal that was not confirmed is refused.
    const third = await makeUser(db);
    await addMember(db, { teamId: team.id, userId: third.id, role: "viewer", actorId: owner.id });
    const unconfirmed = await page.request.post(`/teams/${team.id}/members`, {
      headers: sameOrigin(),
      form: { intent: "remove-member", userId: third.id },
    });
    expect(unconfirmed.status()).toBe(400);
    expect(await getRole(db, team.id, third.id)).toBe("viewer");
    await context.close();
  });

  it("is for owners: an editor gets 403 when inviting, an outsider 404 for the page", async () => {
    const owner = await makeUser(db);
    const editor = await makeUser(db);
    const outsider = await makeUser(db);
    const team = await makeTeam(db, { owner, members: [{ user: editor, role: "editor" }] });
    const asEditor = await signInAs(e2e.browser, editor);
    await asEditor.page.goto(`/teams/${team.id}/members`);
    await asEditor.page.getByTestId("members-table").waitFor();
    for (const name of ["Send invitation", "Change"]) expect(await asEditor.page.getByRole("button", { name }).count(), name).toBe(0);
    const invite = await asEditor.page.request.post(`/teams/${team.id}/members`, {
      headers: sameOrigin(),
      form: { intent: "invite", email: address("sneaky"), role: "owner" },
    });
    expect(invite.status()).toBe(403);
    expect(await db.select().from(invitations).where(eq(invitations.teamId, team.id))).toEqual([]);
    await asEditor.context.close();

    const asOutsider = await signInAs(e2e.browser, outsider);
    const page = await asOutsider.page.goto(`/teams/${team.id}/members`);
    expect(page?.status()).toBe(404);
    const remove = await asOutsider.page.goto(`/teams/${team.id}/members/${editor.id}/remove`);
    expect(remove?.status()).toBe(404);
    await asOutsider.context.close();
  });
});
