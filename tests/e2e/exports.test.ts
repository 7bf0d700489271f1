/** The export downloads a person opens from the app: `/effects/:id/export.zip` and `/projects/:id/export.zip`. */
import { exportBundle, parseEffect } from "@skewsmith/core";
import { strFromU8, unzipSync } from "fflate";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createDb } from "../../app/db/client.server.ts";
import type { EffectRow, Project, User } from "../../app/db/schema.ts";
import { deleteEffect, saveEffectDocument } from "../../app/models/effects.server.ts";
import { makeEffect, makeProject, makeTargetProfile, makeTeam, makeUser } from "../factories.ts";
import { sessionCookie } from "./session.ts";
import { appUrl } from "./support.ts";

const db = createDb(process.env.DATABASE_URL!, { max: 2 });
/** A signed-in person's GETs, answered as they come (no redirect followed). */
interface Caller {
  get(path: string, options?: { headers?: Record<string, string> }): Promise<Response>;
}
let viewer: Caller;
let outsider: Caller;
const caller = (cookie: string | null): Caller => ({
  get: (path, options = {}) =>
    fetch(`${appUrl()}${path}`, { redirect: "manual", headers: { ...(cookie ? { Cookie: cookie } : {}), ...options.headers } }),
});
let owner: User;
let project: Project;
let beacon: EffectRow;
let gone: EffectRow;

const DOC = { canvas: { width: 24, height: 16 }, pivot: { x: 12, y: 8 }, angles: { sweep: { from: 0, to: 90, frames: 6 } } };

beforeAll(async () => {
  owner = await makeUser(db);
  const viewerUser = await makeUser(db);
  const outsiderUser = await makeUser(db);
  const team = await makeTeam(db, { owner, members: [{ user: viewerUser, role: "viewer" }] });
  await makeTeam(db, { owner: outsiderUser });
  project = await makeProject(db, { team, actor: owner, name: "Export quay" });
  const quay = await makeTargetProfile(db, { team, labelPrefix: "quay", dialects: ["6502", "c"] });
  beacon = await makeEffect(db, { project, actor: owner, name: "Beacon", document: DOC, targetProfile: quay });
  await makeEffect(db, { project, actor: owner, name: "Anchor", document: { ...DOC, angles: { list: [0, 45] } } });
  gone = await makeEffect(db, { project, actor: owner, name: "Gone", document: DOC });
  await deleteEffect(db, { effectId: gone.id, actorId: owner.id });
  viewer = caller(await sessionCookie(viewerUser));
  outsider = caller(await sessionCookie(outsiderUser));
});
afterAll(async () => {
  await db.$client.end();
});

describe("an effect's export download", () => {
  it("gives a viewer the zip of the saved effect with the profile's label and dialects, an ETag, and 304 when unchanged", async () => {
    const res = await viewer.get(`/effects/${beacon.id}/export.zip`);
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toBe("application/zip");
    expect(res.headers.get("content-disposition")).toBe('attachment; filename="quay_beacon.zip"');
    const etag = res.headers.get("etag");
    expect(etag).toMatch(/^"[A-Za-z0-9_-]{32}"$/);
    const body = Buffer.from(await res.arrayBuffer());
    // The bytes are core's bundle of the stored document with the profile's defaults (its prefix before the effect's
    // own label, 6502 and C).
    const expected = exportBundle(parseEffect(DOC), { name: "Beacon", label: "quay_beacon", outputs: ["c", "6502"] });
    expect(body.equals(Buffer.from(expected.zip))).toBe(true);
    expect(Object.keys(unzipSync(body)).sort()).toEqual([
      "README.txt",
      "quay_beacon.6502.s",
      "quay_beacon.c",
      "quay_beacon.effect.json",
      "quay_beacon.h",
    ]);

    const again = await viewer.get(`/effects/${beacon.id}/export.zip`, { headers: { "If-None-Match": etag! } });
    expect(again.status).toBe(304);
    expect(again.headers.get("etag")).toBe(etag);
    expect((await again.arrayBuffer()).byteLength).toBe(0);

    // Options from the query change the bundle and its ETag.
    const json = await viewer.get(`/effects/${beacon.id}/export.zip?outputs=json&label=lamp`, { headers: { "If-None-Match": etag! } });
    expect(json.status).toBe(200);
    expect(json.headers.get("etag")).not.toBe(etag);
    expect(Object.keys(unzipSync(Buffer.from(await json.arrayBuffer()))).sort()).toEqual(["README.txt", "lamp.effect.json", "lamp.json"]);
  });

  it("gets a new ETag once someone saves the effect", async () => {
    const effect = await makeEffect(db, { project, actor: owner, document: DOC });
    const first = await viewer.get(`/effects/${effect.id}/export.zip`);
    await saveEffectDocument(db, { effectId: effect.id, expectedVersion: 1, actorId: owner.id, document: { ...DOC, edges: "clip" } });
    const second = await viewer.get(`/effects/${effect.id}/export.zip`, { headers: { "If-None-Match": first.headers.get("etag")! } });
    expect(second.status).toBe(200);
    expect(second.headers.get("etag")).not.toBe(first.headers.get("etag"));
    expect(
      strFromU8(unzipSync(Buffer.from(await second.arrayBuffer()))[`${effect.name.toLowerCase().replace(/[^a-z0-9]+/g, "_")}.effect.json`]),
    ).toContain('"edges": "clip"');
  });

  it("answers a bad option with a 400 in JSON naming the parameter and the allowed values", async () => {
    const res = await viewer.get(`/effects/${beacon.id}/export.zip?registerBits=64`);
    expect(res.status).toBe(400);
    expect(res.headers.get("content-type")).toMatch(/^application\/json/);
    expect(await res.json()).toEqual({
      error: {
        field: "registerBits",
        message: "registerBits: 64 is not allowed; allowed a whole number from 1 to 32, or none",
        requestId: res.headers.get("X-Request-Id"),
      },
    });
  });

  it("is 404 for an outsider, a deleted effect and a malformed id, and sends a visitor to sign in", async () => {
    for (const path of [`/effects/${beacon.id}/export.zip`, `/effects/${gone.id}/export.zip`, `/effects/not-an-id/export.zip`]) {
      const res = await (path.includes(gone.id) ? viewer : outsider).get(path);
      expect(res.status, path).toBe(404);
      expect((await res.json()).error.message, path).toMatch(/There is nothing here, or it belongs to a team you are not in\.|was deleted/);
    }
    const visitor = await caller(null).get(`/effects/${beacon.id}/export.zip`);
    expect(visitor.status).toBe(302);
    expect(visitor.headers.get("location")).toBe(`/sign-in?next=${encodeURIComponent(`/effects/${beacon.id}/export.zip`)}`);
  });
});

describe("a project's export download", () => {
  it("holds every live effect in its own folder, with an ETag and 304", async () => {
    const res = await viewer.get(`/projects/${project.id}/export.zip`);
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toBe("application/zip");
    expect(res.headers.get("content-disposition")).toBe('attachment; filename="export-quay.zip"');
    const names = Object.keys(unzipSync(Buffer.from(await res.arrayBuffer())));
    expect(names).toContain("README.txt");
    expect(names).toContain("quay_beacon/quay_beacon.6502.s");
    expect(names).toContain("anchor/anchor.c");
    expect(names.some((n) => n.startsWith("gone/"))).toBe(false);
    const again = await viewer.get(`/projects/${project.id}/export.zip`, { headers: { "If-None-Match": res.headers.get("etag")! } });
    expect(again.status).toBe(304);
  });

  it("is 404 for an outsider and 400 for a bad option", async () => {
    const res = await outsider.get(`/projects/${project.id}/export.zip`);
    expect(res.status).toBe(404);
    const bad = await viewer.get(`/projects/${project.id}/export.zip?outputs=c,basic`);
    expect(bad.status).toBe(400);
    expect((await bad.json()).error.field).toBe("outputs");
  });
});
