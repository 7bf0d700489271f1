import { describe, expect, it } from "vitest";
import type { TargetProfile } from "../../app/db/schema.ts";
import { getEffect } from "../../app/models/effects.server.ts";
import { detachEffect, getTargetProfile, listTargetProfiles, updateTargetProfile } from "../../app/models/targetProfiles.server.ts";
import { STARTER_PROFILES } from "../../app/profiles/starters.ts";
import { makeEffect, makeProject, makeTargetProfile, makeTeam, makeUser, unique } from "../factories.ts";
import { appUrl, screenshot, signInAs, sameOrigin, browserAndDb } from "./support.ts";
import { screenshotsAtTwoWidths } from "./teamSupport.ts";

const e2e = browserAndDb();
const { db } = e2e;

async function setup() {
  const owner = await makeUser(db);
  const editor = await makeUser(db);
  const viewer = await makeUser(db);
  const team = await makeTeam(db, {
    owner,
    name: `Harbour Lights ${unique()}`,
    members: [
      { user: editor, role: "editor" },
      { user: viewer, role: "viewer" },
    ],
  });
  const project = await makeProject(db, { team, actor: owner, name: "Storm level" });
  const profile = await makeTargetProfile(db, {
    team,
    actor: owner,
    name: `Storm screen ${unique()}`,
    canvasWidth: 256,
    canvasHeight: 224,
    columnGroup: 16,
    dialects: ["c"],
    labelPrefix: "storm",
  });
  const following = await makeEffect(db, { project, actor: owner, name: "Sky tilt", targetProfile: profile });
  const detached = await makeEffect(db, { project, actor: owner, name: "Sea tilt", targetProfile: profile });
  await detachEffect(db, { effectId: detached.id, actorId: owner.id });
  return { owner, editor, viewer, team, project, profile, following, detached: (await getEffect(db, detached.id))! };
}

function settingsOf(profile: TargetProfile) {
  const { id: _i, teamId: _t, version: _v, createdAt: _c, updatedAt: _u, ...settings } = profile;
  return settings;
}

describe("target profiles", () => {
  it("an editor adds starting profiles, creates one, edits one (following effects change, detached ones do not), duplicates and deletes", async () => {
    const { editor, team, profile, following, detached } = await setup();
    const { context, page } = await signInAs(e2e.browser, editor);

    await page.goto(`/teams/${team.id}`);
    await page.getByRole("link", { name: "Manage target profiles" }).click();
    await page.waitForURL(`${appUrl()}/teams/${team.id}/profiles`);
    await screenshotsAtTwoWidths(page, "profiles-list", screenshot);
    const [first, second] = STARTER_PROFILES;
    await page.getByLabel(first.settings.name).check();
    await page.getByLabel(second.settings.name).check();
    await page.getByRole("button", { name: "Add the ticked profiles" }).click();
    await expect.poll(() => page.getByText(`Added ${first.settings.name}; ${second.settings.name}.`).count()).toBe(1);
    await expect.poll(() => page.getByTestId(`profile-row-${second.settings.name}`).textContent()).toContain("320 × 224");

    // A new profile: a field message from core's label rule keeps what was typed; then it is created.
    await page.getByRole("link", { name: "New target profile" }).click();
    await page.waitForURL(`${appUrl()}/teams/${team.id}/profiles/new`);
    const name = `Wide handheld ${unique()}`;
    await page.getByLabel("Profile name").fill(name);
    await page.getByLabel("Canvas width").fill("240");
    await page.getByLabel("Canvas height").fill("160");
    await page.getByLabel("Column group").fill("8");
    await page.getByLabel(/ARM assembler/).check();
    await page.getByLabel("Label prefix").fill("int");
    await page.getByLabel("Sign", { exact: true }).selectOption("scroll");
    await screenshotsAtTwoWidths(page, "profile-new", screenshot);
    await page.getByRole("button", { name: "Create target profile" }).click();
    await expect
      .poll(() => page.locator("#profile-labelPrefix-error").textContent())
      .toMatch(/^The label prefix must be .*a C or C\+\+ keyword/);
    expect(await page.getByLabel("Canvas width").inputValue()).toBe("240");
    expect(await page.getByLabel(/ARM assembler/).isChecked()).toBe(true);
    await page.getByLabel("Label prefix").fill("hh");
    await page.getByRole("button", { name: "Create target profile" }).click();
    await page.waitForURL(/\/profiles\/[0-9a-f-]{36}$/);
    await expect.poll(() => page.getByRole("heading", { level: 1 }).textContent()).toBe(name);
    const created = (await listTargetProfiles(db, team.id)).find((p) => p.name === name)!;
    expect(created).toMatchObject({
      canvasWidth: 240,
      canvasHeight: 160,
      columnGroup: 8,
      dialects: ["arm"],
      labelPrefix: "hh",
      exportOptions: { sign: "scroll" },
    });

    // Edit the profile two effects use: the following one changes (new version), the detached one keeps its own settings.
    await page.goto(`/teams/${team.id}/profiles/${profile.id}`);
    await expect
      .poll(() => page.getByTestId("profile-effects").textContent())
      .toMatch(/Sea tilt.*detached: keeps its own.*Sky tilt.*follows the profile/);
    await page.getByLabel("Canvas width").fill("320");
    await page.getByLabel("Rounding").selectOption("floor");
    await page.getByRole("button", { name: "Save profile" }).click();
    await expect.poll(() => page.getByText("Saved version 2. 1 following effect was updated, each with a new version.").count()).toBe(1);
    const after = (await getEffect(db, following.id))!;
    expect(after.version).toBe(following.version + 1);
    expect(after.document).toMatchObject({ canvas: { width: 320, height: 224 }, pivot: { x: 160, y: 112 }, rounding: "floor" });
    expect(await getEffect(db, detached.id)).toEqual(detached);
    await screenshotsAtTwoWidths(page, "profile-edit", screenshot);
    // The following effect's bench says what reached it and when; the detached one's says nothing.
    await page.goto(`/effects/${following.id}`);
    await expect
      .poll(() => page.getByRole("region", { name: "Last change from the target profile" }).textContent())
      .toMatch(
        new RegExp(
          `^Target profile ${profile.name} \\(version 2\\) changed by .+ on .+; this effect is at version ${after.version} since\\.` +
            `.*Canvas256 × 224.*became320 × 224.*Roundingnearest-away.*becamefloor`,
        ),
      );
    await page.goto(`/effects/${detached.id}`);
    await expect.poll(() => page.getByRole("heading", { level: 1 }).textContent()).toBe("Sea tilt");
    expect(await page.getByTestId("profile-change-notice").count()).toBe(0);
    await page.goto(`/teams/${team.id}/profiles/${profile.id}`);

    // Someone else saves meanwhile: this page's save is refused with 409, and nothing is overwritten.
    const now = (await getTargetProfile(db, profile.id))!;
    await updateTargetProfile(db, {
      ...settingsOf(now),
      edges: "clip",
      teamId: team.id,
      profileId: profile.id,
      expectedVersion: 2,
      actorId: editor.id,
    });
    await page.getByLabel("Half-turn").selectOption("shear");
    const [response] = await Promise.all([
      page.waitForResponse((r) => r.request().method() === "POST" && r.url().includes(profile.id)),
      page.getByRole("button", { name: "Save profile" }).click(),
    ]);
    expect(response.status()).toBe(409);
    await expect
      .poll(() => page.getByRole("alert").first().textContent())
      .toMatch(
        /^Someone changed this target profile after you opened it \(now version 3, you started from version 2\)\. Nothing was saved/,
      );
    expect(await page.getByLabel("Half-turn").inputValue()).toBe("shear");
    expect(await getTargetProfile(db, profile.id)).toMatchObject({ version: 3, edges: "clip", halfTurn: "flip" });
    await screenshotsAtTwoWidths(page, "profile-stale", screenshot);
    // Saving again from the same page is still refused: it still started from version 2.
    await page.getByRole("button", { name: "Save profile" }).click();
    await expect.poll(() => page.getByRole("alert").first().textContent()).toContain("now version 3, you started from version 2");
    await page.getByRole("link", { name: "Reload the profile" }).click();
    await expect.poll(() => page.getByLabel("Edges").inputValue()).toBe("clip");

    // Duplicate, then delete the original after a confirmation that names how many effects it detaches.
    await page.getByRole("button", { name: "Duplicate" }).click();
    await expect.poll(() => page.getByRole("heading", { level: 1 }).textContent()).toBe(`${profile.name} copy`);
    await page.goto(`/teams/${team.id}/profiles/${profile.id}`);
    await page.getByRole("link", { name: `Delete ${profile.name}` }).click();
    const dialog = page.getByRole("dialog", { name: `Delete the target profile “${profile.name}”?` });
    await dialog.waitFor();
    expect(await dialog.textContent()).toContain(`2 effects use “${profile.name}”`);
    await screenshotsAtTwoWidths(page, "profile-delete-dialog", screenshot);
    await dialog.getByRole("button", { name: "Delete and detach 2 effects" }).click();
    await page.waitForURL(`${appUrl()}/teams/${team.id}/profiles`);
    await expect.poll(() => page.getByTestId(`profile-row-${profile.name}`).count()).toBe(0);
    await expect
      .poll(() => page.getByRole("region", { name: "Recent profile changes" }).textContent())
      .toContain(`deleted the target profile ${profile.name}; 2 effects detached, keeping their settings`);
    const kept = (await getEffect(db, following.id))!;
    expect(kept).toMatchObject({
      targetProfileId: null,
      followsProfile: false,
      version: after.version + 1,
      document: { canvas: { width: 320 } },
    });
    await context.close();
  });

  it("viewers use profiles but change none (403); outsiders get 404", async () => {
    const { viewer, team, profile } = await setup();
    const outsider = await makeUser(db);
    const asViewer = await signInAs(e2e.browser, viewer);
    const { page } = asViewer;
    await page.goto(`/teams/${team.id}/profiles/${profile.id}`);
    await expect.poll(() => page.getByText("Viewers use target profiles; editors and owners change them.").count()).toBe(1);
    expect(await page.getByLabel("Canvas width").isDisabled()).toBe(true);
    for (const name of ["Save profile", "Duplicate"]) expect(await page.getByRole("button", { name }).count(), name).toBe(0);
    expect(await page.getByRole("link", { name: `Delete ${profile.name}` }).count()).toBe(0);
    await screenshotsAtTwoWidths(page, "profile-viewer", screenshot);

    const save = await page.request.post(`/teams/${team.id}/profiles/${profile.id}`, {
      headers: sameOrigin(),
      form: {
        intent: "save-profile",
        version: "1",
        ...Object.fromEntries(Object.entries(settingsOf(profile)).map(([k, v]) => [k, String(v)])),
      },
    });
    expect(save.status()).toBe(403);
    const remove = await page.request.post(`/teams/${team.id}/profiles/${profile.id}`, {
      headers: sameOrigin(),
      form: { intent: "delete-profile", confirmed: "yes", version: "1", effectCount: "2" },
    });
    expect(remove.status()).toBe(403);
    const starters = await page.request.post(`/teams/${team.id}/profiles`, {
      headers: sameOrigin(),
      form: { intent: "add-starters", starter: STARTER_PROFILES[0].key },
    });
    expect(starters.status()).toBe(403);
    expect((await page.goto(`/teams/${team.id}/profiles/new`))?.status()).toBe(403);
    expect(await getTargetProfile(db, profile.id)).toEqual(profile);
    await asViewer.context.close();

    const asOutsider = await signInAs(e2e.browser, outsider);
    for (const path of [
      `/teams/${team.id}/profiles`,
      `/teams/${team.id}/profiles/${profile.id}`,
      `/teams/${team.id}/profiles/${profile.id}/delete`,
    ])
      expect((await asOutsider.page.goto(path))?.status(), path).toBe(404);
    await asOutsider.context.close();
  });

  it("refuses unknown starting profiles, prototype names included, with a 400 that names the way forward", async () => {
    const { editor, team } = await setup();
    const { context, page } = await signInAs(e2e.browser, editor);
    for (const key of ["__proto__", "constructor", "toString", "nope"]) {
      const response = await page.request.get(`/teams/${team.id}/profiles/new?starter=${encodeURIComponent(key)}`);
      expect(response.status(), key).toBe(400);
      expect(await response.text()).toContain(`There is no starting profile “${key}”`);
    }
    const ok = await page.goto(`/teams/${team.id}/profiles/new?starter=${STARTER_PROFILES[2].key}`);
    expect(ok?.status()).toBe(200);
    expect(await page.getByLabel("Profile name").inputValue()).toBe(STARTER_PROFILES[2].settings.name);
    const posted = await page.request.post(`/teams/${team.id}/profiles`, {
      headers: sameOrigin(),
      form: { intent: "add-starters", starter: "__proto__" },
    });
    expect(posted.status()).toBe(400);
    await context.close();
  });
});
