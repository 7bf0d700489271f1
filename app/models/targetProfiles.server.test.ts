import { checkLabel, exportBundle, LABEL_MAX_LENGTH, parseEffect, resolveExportOptions } from "@skewsmith/core";
import { eq } from "drizzle-orm";
import fc from "fast-check";
import { afterAll, describe, expect, it } from "vitest";
import { makeEffect, makeProject, makeTargetProfile, makeTeam, makeUser } from "../../tests/factories.ts";
import { testDb } from "../../tests/support/db.ts";
import { refusalOf } from "../../tests/support/refusal.ts";
import { effects, targetProfiles, type TargetProfile } from "../db/schema.ts";
import { exportDefaultsForProfile, profileLabel } from "../exports/defaults.ts";
import { STARTER_PROFILES } from "../profiles/starters.ts";
import { listActivity } from "./activity.server.ts";
import { getEffect, saveEffectDocument } from "./effects.server.ts";
import { type DomainError } from "./errors.ts";
import {
  addStarterProfiles,
  checkProfileInput,
  countProfileUsers,
  deleteTargetProfile,
  detachEffect,
  duplicateTargetProfile,
  exportDefaultsForEffect,
  followProfile,
  getTargetProfile,
  listProfileEffects,
  updateTargetProfile,
} from "./targetProfiles.server.ts";
import { getProfileChange } from "./effectChanges.server.ts";

const db = testDb();
afterAll(() => db.$client.end());

async function setup() {
  const owner = await makeUser(db);
  const team = await makeTeam(db, { owner });
  const project = await makeProject(db, { team, actor: owner });
  const profile = await makeTargetProfile(db, {
    team,
    actor: owner,
    canvasWidth: 256,
    canvasHeight: 224,
    columnGroup: 16,
    dialects: ["c"],
    labelPrefix: "storm",
  });
  return { owner, team, project, profile };
}

/** The profile's stored settings as the input of an update, with some changed. */
function edited(profile: TargetProfile, changes: Partial<TargetProfile>) {
  const { id: _i, teamId: _t, version: _v, createdAt: _c, updatedAt: _u, ...settings } = { ...profile, ...changes };
  return settings;
}

describe("checkProfileInput", () => {
  const base = {
    name: "Handheld",
    canvasWidth: 160,
    canvasHeight: 144,
    fixedPointBits: 16,
    fixedPointFraction: 8,
    rounding: "nearest-away",
    halfTurn: "flip",
    edges: "wrap",
    columnGroup: 8,
  };

  it("lets core refuse settings that make no effect, naming the form field", async () => {
    const error = await refusalOf(() => checkProfileInput({ ...base, columnGroup: 161 }));
    expect(error.field).toBe("columnGroup");
    expect(error.message).toBe("Column group: 161 is not allowed; allowed a whole number from 1 to 160 (the canvas width)");
  });

  it("checks the label prefix with core's label rule and the dialects against core's outputs", async () => {
    expect((await refusalOf(() => checkProfileInput({ ...base, labelPrefix: "int" }))).field).toBe("labelPrefix");
    expect((await refusalOf(() => checkProfileInput({ ...base, labelPrefix: "gb_" }))).message).toMatch(/ends in "_"/);
    expect((await refusalOf(() => checkProfileInput({ ...base, dialects: ["ca65"] }))).field).toBe("dialects");
    expect(checkProfileInput({ ...base, dialects: ["bin", "z80", "z80"], labelPrefix: "gb" })).toMatchObject({
      dialects: ["z80", "bin"],
      labelPrefix: "gb",
    });
  });

  it("keeps only export options that differ from core's defaults, and refuses ones core refuses", async () => {
    const settings = checkProfileInput({ ...base, exportOptions: { sign: "shift", split: true, registerBits: null, element: "auto" } });
    expect(settings.exportOptions).toEqual({ split: true });
    const error = await refusalOf(() => checkProfileInput({ ...base, exportOptions: { registerBits: 33 } }));
    expect(error.field).toBe("registerBits");
    const unknown = await refusalOf(() => checkProfileInput({ ...base, exportOptions: { label: "x" } }));
    expect(unknown.message).toMatch(/Unknown export option label/);
  });

  it("accepts every starting profile, whose options core resolves", () => {
    for (const starter of STARTER_PROFILES) {
      const settings = checkProfileInput(starter.settings);
      expect(() => resolveExportOptions({ ...settings.exportOptions, outputs: settings.dialects })).not.toThrow();
    }
  });
});

describe("updateTargetProfile", () => {
  it("refuses a stale version with 409 and writes nothing", async () => {
    const { owner, team, project, profile } = await setup();
    const effect = await makeEffect(db, { project, actor: owner, targetProfile: profile });
    await updateTargetProfile(db, {
      ...edited(profile, { canvasWidth: 320 }),
      teamId: team.id,
      profileId: profile.id,
      expectedVersion: 1,
      actorId: owner.id,
    });
    const error = await refusalOf(
      updateTargetProfile(db, {
        ...edited(profile, { canvasWidth: 128 }),
        teamId: team.id,
        profileId: profile.id,
        expectedVersion: 1,
        actorId: owner.id,
      }),
    );
    expect(error.status).toBe(409);
    expect(error.message).toMatch(/now version 2, you started from version 1/);
    expect((await getTargetProfile(db, profile.id))?.canvasWidth).toBe(320);
    expect((await getEffect(db, effect.id))?.document.canvas.width).toBe(320);
  });

  it("flows into following effects (documents rebuilt by core, versions bumped) and leaves detached ones alone", async () => {
    const { owner, team, project, profile } = await setup();
    const following = await makeEffect(db, { project, actor: owner, targetProfile: profile });
    const detached = await makeEffect(db, { project, actor: owner, targetProfile: profile });
    await detachEffect(db, { effectId: detached.id, actorId: owner.id });
    const detachedBefore = (await getEffect(db, detached.id))!;

    const update = await updateTargetProfile(db, {
      ...edited(profile, { canvasWidth: 320, fixedPointBits: 32, fixedPointFraction: 16, edges: "clip" }),
      teamId: team.id,
      profileId: profile.id,
      expectedVersion: 1,
      actorId: owner.id,
    });
    expect(update.effectsUpdated).toBe(1);
    expect(update.profile.version).toBe(2);

    const after = (await getEffect(db, following.id))!;
    expect(after.version).toBe(following.version + 1);
    // The new canvas with the pivot still at its centre (it was at the old one), the rest of the document as it was.
    expect(after.document).toEqual(
      parseEffect({
        ...following.document,
        canvas: { width: 320, height: 224 },
        pivot: { x: 160, y: 112 },
        fixedPoint: { bits: 32, fraction: 16 },
        edges: "clip",
      }),
    );
    const change = (await getProfileChange(db, following.id))!;
    expect(change).toMatchObject({ profileId: profile.id, profileVersion: 2, effectVersion: after.version });
    expect(change.changes).toEqual([
      { field: "canvas", label: "Canvas", from: "256 × 224", to: "320 × 224" },
      { field: "fixedPoint", label: "Fixed point", from: "Q8.8 (16 bits)", to: "Q16.16 (32 bits)" },
      { field: "edges", label: "Edges", from: "wrap", to: "clip" },
      { field: "pivot", label: "Pivot", from: "(128, 112)", to: "(160, 112)" },
    ]);

    expect(await getEffect(db, detached.id)).toEqual(detachedBefore);
    expect(await getProfileChange(db, detached.id)).toBeNull();
    const [activity] = await listActivity(db, { teamId: team.id });
    expect(activity.summary).toMatch(/^changed the target profile .*canvas 256 × 224 → 320 × 224.*; 1 following effect updated$/);
  });

  it("keeps an off-centre pivot where it is, pulled inside a smaller canvas", async () => {
    const { owner, team, project, profile } = await setup();
    const document = { canvas: { width: 256, height: 224 }, pivot: { x: 200.5, y: 20 }, angles: { list: [0, 10] }, columnGroup: 16 };
    const effect = await makeEffect(db, { project, actor: owner, targetProfile: profile, document });
    await updateTargetProfile(db, {
      ...edited(profile, { canvasWidth: 160, canvasHeight: 144, columnGroup: 8 }),
      teamId: team.id,
      profileId: profile.id,
      expectedVersion: 1,
      actorId: owner.id,
    });
    expect((await getEffect(db, effect.id))?.document.pivot).toEqual({ x: 160, y: 20 });
  });

  it("tells detached effects about changed export settings, without touching their documents", async () => {
    const { owner, team, project, profile } = await setup();
    const detached = await makeEffect(db, { project, actor: owner, targetProfile: profile });
    await detachEffect(db, { effectId: detached.id, actorId: owner.id });
    await updateTargetProfile(db, {
      ...edited(profile, { dialects: ["6502", "bin"], labelPrefix: "rain" }),
      teamId: team.id,
      profileId: profile.id,
      expectedVersion: 1,
      actorId: owner.id,
    });
    const after = (await getEffect(db, detached.id))!;
    expect(after.version).toBe(detached.version);
    expect((await getProfileChange(db, detached.id))?.changes).toEqual([
      { field: "dialects", label: "Export dialects", from: "c", to: "6502, bin" },
      { field: "labelPrefix", label: "Label prefix", from: "storm", to: "rain" },
    ]);
  });

  it("makes a bench save that started from the old version a clean 409", async () => {
    const { owner, team, project, profile } = await setup();
    const effect = await makeEffect(db, { project, actor: owner, targetProfile: profile });
    await updateTargetProfile(db, {
      ...edited(profile, { rounding: "floor" }),
      teamId: team.id,
      profileId: profile.id,
      expectedVersion: 1,
      actorId: owner.id,
    });
    const error = await refusalOf(
      saveEffectDocument(db, {
        effectId: effect.id,
        document: { ...effect.document, angles: { list: [1, 2, 3] } },
        expectedVersion: effect.version,
        actorId: owner.id,
      }),
    );
    expect(error.status).toBe(409);
    expect((await getEffect(db, effect.id))?.document.rounding).toBe("floor");
  });

  it("loses neither change when a profile change and a bench save race", async () => {
    for (let round = 0; round < 6; round++) {
      const { owner, team, project, profile } = await setup();
      const effect = await makeEffect(db, { project, actor: owner, targetProfile: profile });
      const [profileResult, saveResult] = await Promise.allSettled([
        updateTargetProfile(db, {
          ...edited(profile, { halfTurn: "shear" }),
          teamId: team.id,
          profileId: profile.id,
          expectedVersion: 1,
          actorId: owner.id,
        }),
        saveEffectDocument(db, {
          effectId: effect.id,
          document: { ...effect.document, angles: { list: [5, 6] } },
          expectedVersion: effect.version,
          actorId: owner.id,
        }),
      ]);
      expect(profileResult.status).toBe("fulfilled");
      const final = (await getEffect(db, effect.id))!;
      expect(final.document.halfTurn).toBe("shear");
      if (saveResult.status === "fulfilled") {
        // The save went first; the profile change then built on it.
        expect(final.document.angles).toEqual({ list: [5, 6] });
        expect(final.version).toBe(effect.version + 2);
      } else {
        expect((saveResult.reason as DomainError).status).toBe(409);
        expect(final.document.angles).toEqual(effect.document.angles);
        expect(final.version).toBe(effect.version + 1);
      }
    }
  });

  it("answers 404 for a profile of another team", async () => {
    const { owner, profile } = await setup();
    const other = await makeTeam(db, { owner });
    const error = await refusalOf(
      updateTargetProfile(db, { ...edited(profile, {}), teamId: other.id, profileId: profile.id, expectedVersion: 1, actorId: owner.id }),
    );
    expect(error.status).toBe(404);
  });
});

describe("duplicateTargetProfile and deleteTargetProfile", () => {
  it("copies the settings under a free name, used by no effect", async () => {
    const { owner, team, project, profile } = await setup();
    await makeEffect(db, { project, actor: owner, targetProfile: profile });
    const copy = await duplicateTargetProfile(db, { teamId: team.id, profileId: profile.id, actorId: owner.id });
    const again = await duplicateTargetProfile(db, { teamId: team.id, profileId: profile.id, actorId: owner.id });
    expect([copy.name, again.name]).toEqual([`${profile.name} copy`, `${profile.name} copy 2`]);
    expect(edited(copy, { name: profile.name })).toEqual(edited(profile, {}));
    expect(copy.version).toBe(1);
    expect(await countProfileUsers(db, copy.id)).toBe(0);
  });

  it("refuses when the number of effects differs from the one confirmed, then detaches them, keeping their settings", async () => {
    const { owner, team, project, profile } = await setup();
    const a = await makeEffect(db, { project, actor: owner, targetProfile: profile });
    const b = await makeEffect(db, { project, actor: owner, targetProfile: profile });
    const wrong = await refusalOf(
      deleteTargetProfile(db, { teamId: team.id, profileId: profile.id, expectedVersion: 1, expectedEffectCount: 1, actorId: owner.id }),
    );
    expect(wrong.message).toMatch(/^2 effects use this profile now, not the 1 you confirmed/);
    expect(await getTargetProfile(db, profile.id)).not.toBeNull();

    expect(
      await deleteTargetProfile(db, {
        teamId: team.id,
        profileId: profile.id,
        expectedVersion: 1,
        expectedEffectCount: 2,
        actorId: owner.id,
      }),
    ).toEqual({ detached: 2 });
    expect(await getTargetProfile(db, profile.id)).toBeNull();
    for (const before of [a, b]) {
      const after = (await getEffect(db, before.id))!;
      expect(after).toMatchObject({ document: before.document, version: before.version, targetProfileId: null, followsProfile: false });
      expect((await getProfileChange(db, before.id))?.changes).toEqual([
        { field: "profile", label: "Target profile", from: profile.name, to: "deleted: the effect keeps its own settings" },
      ]);
    }
  });
});

describe("following and detaching", () => {
  it("an effect with its own settings follows a profile: settings replaced, version bumped, change recorded", async () => {
    const { owner, project, profile } = await setup();
    const effect = await makeEffect(db, { project, actor: owner });
    const followed = await followProfile(db, {
      effectId: effect.id,
      profileId: profile.id,
      expectedVersion: effect.version,
      actorId: owner.id,
    });
    expect(followed).toMatchObject({ targetProfileId: profile.id, followsProfile: true, version: effect.version + 1 });
    expect(followed.document.canvas).toEqual({ width: 256, height: 224 });
    expect(followed.document.pivot).toEqual({ x: 128, y: 112 });
    expect((await getProfileChange(db, effect.id))?.changes[0]).toEqual({
      field: "profile",
      label: "Target profile",
      from: "own settings",
      to: `follows ${profile.name}`,
    });
    expect((await listProfileEffects(db, profile.id)).map((e) => [e.id, e.followsProfile])).toEqual([[effect.id, true]]);
    await detachEffect(db, { effectId: effect.id, actorId: owner.id });
    expect((await listProfileEffects(db, profile.id)).map((e) => [e.id, e.followsProfile])).toEqual([[effect.id, false]]);
  });

  it("refuses a profile of another team", async () => {
    const { owner, project } = await setup();
    const stranger = await makeUser(db);
    const otherProfile = await makeTargetProfile(db, { team: await makeTeam(db, { owner: stranger }) });
    const effect = await makeEffect(db, { project, actor: owner });
    const error = await refusalOf(
      followProfile(db, { effectId: effect.id, profileId: otherProfile.id, expectedVersion: 1, actorId: owner.id }),
    );
    expect(error.status).toBe(404);
  });
});

describe("addStarterProfiles", () => {
  it("adds the chosen starting profiles once, and refuses keys it does not know (prototype names included)", async () => {
    const { owner, team } = await setup();
    const keys = STARTER_PROFILES.map((s) => s.key);
    expect(await addStarterProfiles(db, { teamId: team.id, keys, actorId: owner.id })).toEqual(
      STARTER_PROFILES.map((s) => s.settings.name),
    );
    expect(await addStarterProfiles(db, { teamId: team.id, keys, actorId: owner.id })).toEqual([]);
    for (const key of ["__proto__", "constructor", "toString"])
      expect((await refusalOf(addStarterProfiles(db, { teamId: team.id, keys: [key], actorId: owner.id }))).field).toBe("starter");
    const rows = await db.select().from(targetProfiles).where(eq(targetProfiles.teamId, team.id));
    expect(rows).toHaveLength(1 + STARTER_PROFILES.length);
  });
});

describe("export defaults", () => {
  it("profileLabel puts the prefix before the effect's own label and always gives a label core accepts", () => {
    expect(profileLabel("storm", "Background tilt")).toBe("storm_background_tilt");
    expect(profileLabel("", "Background tilt")).toBe("background_tilt");
    // 24 characters joined, one more than core allows: the last word goes, not its last letter.
    expect(profileLabel("rose", "Compass rose emblem")).toBe("rose_compass_rose");
    expect(profileLabel("x", "Supercalifragilisticexpialidocious")).toBe("x_supercalifragilistice");
    fc.assert(
      fc.property(fc.stringMatching(/^[a-z][a-z0-9]{0,11}$/), fc.string({ maxLength: 100 }), (prefix, name) => {
        let valid = true;
        try {
          checkLabel(prefix);
        } catch {
          valid = false;
        }
        fc.pre(valid);
        const label = profileLabel(prefix, name);
        expect(checkLabel(label)).toBe(label);
        expect(label.length).toBeLessThanOrEqual(LABEL_MAX_LENGTH);
        expect(label.startsWith(prefix)).toBe(true);
      }),
    );
  });

  it("an export under the profile's defaults has its label and only its dialects' files", async () => {
    const { owner, team, project, profile } = await setup();
    const updated = await updateTargetProfile(db, {
      ...edited(profile, { dialects: ["6502", "bin"], exportOptions: { sign: "scroll", split: true } }),
      teamId: team.id,
      profileId: profile.id,
      expectedVersion: 1,
      actorId: owner.id,
    });
    const effect = await makeEffect(db, { project, actor: owner, name: "Harbour tilt", targetProfile: updated.profile });
    const defaults = await exportDefaultsForEffect(db, effect);
    expect(defaults).toEqual({ name: "Harbour tilt", label: "storm_harbour_tilt", outputs: ["6502", "bin"], sign: "scroll", split: true });
    const bundle = exportBundle(effect.document, defaults);
    expect(bundle.files.map((f) => f.name)).toEqual([
      "README.txt",
      "storm_harbour_tilt.6502.s",
      "storm_harbour_tilt.le.bin",
      "storm_harbour_tilt.be.bin",
      "storm_harbour_tilt.effect.json",
    ]);
    expect(bundle.options).toMatchObject({ sign: "scroll", split: true });
    // Without a profile: core's own defaults, the label from the name.
    expect(exportDefaultsForProfile(null, "Harbour tilt")).toEqual({ name: "Harbour tilt", label: "harbour_tilt" });
  });

  it("leaves out stored options core no longer accepts rather than breaking the export", () => {
    const defaults = exportDefaultsForProfile(
      { dialects: ["c", "ca65"], labelPrefix: "x_", exportOptions: { sign: "sideways", dedupe: true } },
      "Fx",
    );
    expect(defaults).toEqual({ name: "Fx", label: "fx", outputs: ["c"], dedupe: true });
    expect(() => resolveExportOptions(defaults)).not.toThrow();
  });
});

describe("stored rows", () => {
  it("counts every effect naming the profile, deleted ones too", async () => {
    const { owner, project, profile } = await setup();
    const effect = await makeEffect(db, { project, actor: owner, targetProfile: profile });
    await db.update(effects).set({ deletedAt: new Date() }).where(eq(effects.id, effect.id));
    expect(await countProfileUsers(db, profile.id)).toBe(1);
    expect(await listProfileEffects(db, profile.id)).toEqual([]);
  });
});
