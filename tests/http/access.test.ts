/**
 * Who may read what, at every address that answers with data: pages and resource routes (sprite images, effect
 * documents). A visitor is sent to sign in; someone outside the team gets exactly the answer an id of nothing or a
 * malformed id gets (status and words), so ids cannot be probed; members read; nobody writes to a file.
 */
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { createDb } from "../../app/db/client.server.ts";
import { NOT_FOUND_MESSAGE } from "../../app/guards.server.ts";
import { client, errorMessageOf } from "../support/http.ts";
import { makeWorld, type World } from "../support/world.ts";

const db = createDb(process.env.DATABASE_URL!, { max: 2 });
let world: World;
beforeAll(async () => {
  world = await makeWorld(db, inject("appUrl"), inject("githubUrl"));
});
afterAll(() => db.$client.end());

const NOTHING = "00000000-0000-4000-8000-000000000000";

/** The addresses of a world's things, and the same address for an id of nothing and a malformed one. */
const ADDRESSES = (w: World) => [
  { what: "sprite image", path: (id: string) => `/sprites/${id}/image.png`, mine: w.sprite.id, theirs: w.foreign.sprite.id, file: true },
  {
    what: "effect document",
    path: (id: string) => `/effects/${id}/document.json`,
    mine: w.effect.id,
    theirs: w.foreign.effect.id,
    file: true,
  },
  {
    what: "effect diagnostics",
    path: (id: string) => `/effects/${id}/diagnostics.json`,
    mine: w.effect.id,
    theirs: w.foreign.effect.id,
    file: true,
  },
  {
    what: "frame PNG",
    path: (id: string) => `/effects/${id}/frames/0.png?pass=2`,
    mine: w.effect.id,
    theirs: w.foreign.effect.id,
    file: true,
  },
  { what: "contact sheet", path: (id: string) => `/effects/${id}/frames.png`, mine: w.effect.id, theirs: w.foreign.effect.id, file: true },
  { what: "effect bundle", path: (id: string) => `/effects/${id}/export.zip`, mine: w.effect.id, theirs: w.foreign.effect.id, file: true },
  {
    what: "project bundle",
    path: (id: string) => `/projects/${id}/export.zip`,
    mine: w.project.id,
    theirs: w.foreign.project.id,
    file: true,
  },
  {
    what: "sprite list",
    path: (id: string) => `/projects/${id}/sprites.json`,
    mine: w.project.id,
    theirs: w.foreign.project.id,
    file: true,
  },
  { what: "API projects", path: (id: string) => `/api/v1/teams/${id}/projects`, mine: w.team.id, theirs: w.foreign.team.id, file: true },
  {
    what: "API effects",
    path: (id: string) => `/api/v1/projects/${id}/effects`,
    mine: w.project.id,
    theirs: w.foreign.project.id,
    file: true,
  },
  { what: "API effect", path: (id: string) => `/api/v1/effects/${id}`, mine: w.effect.id, theirs: w.foreign.effect.id, file: true },
  {
    what: "API effect bundle",
    path: (id: string) => `/api/v1/effects/${id}/export.zip`,
    mine: w.effect.id,
    theirs: w.foreign.effect.id,
    file: true,
  },
  {
    what: "API project bundle",
    path: (id: string) => `/api/v1/projects/${id}/export.zip`,
    mine: w.project.id,
    theirs: w.foreign.project.id,
    file: true,
  },
  { what: "team page", path: (id: string) => `/teams/${id}`, mine: w.team.id, theirs: w.foreign.team.id, file: false },
  { what: "members page", path: (id: string) => `/teams/${id}/members`, mine: w.team.id, theirs: w.foreign.team.id, file: false },
  { what: "profiles page", path: (id: string) => `/teams/${id}/profiles`, mine: w.team.id, theirs: w.foreign.team.id, file: false },
  { what: "sprites page", path: (id: string) => `/projects/${id}/sprites`, mine: w.project.id, theirs: w.foreign.project.id, file: false },
  {
    what: "activity page",
    path: (id: string) => `/projects/${id}/activity`,
    mine: w.project.id,
    theirs: w.foreign.project.id,
    file: false,
  },
  { what: "project page", path: (id: string) => `/projects/${id}`, mine: w.project.id, theirs: w.foreign.project.id, file: false },
  { what: "effect page", path: (id: string) => `/effects/${id}`, mine: w.effect.id, theirs: w.foreign.effect.id, file: false },
  { what: "project data", path: (id: string) => `/projects/${id}.data`, mine: w.project.id, theirs: w.foreign.project.id, file: false },
];

async function answer(response: Response): Promise<{ status: number; message: string | null }> {
  const type = response.headers.get("Content-Type") ?? "";
  if (type.includes("application/json"))
    return { status: response.status, message: ((await response.json()) as { error: { message: string } }).error.message };
  if (type.includes("text/html")) return { status: response.status, message: errorMessageOf(await response.text()) };
  const text = await response.text();
  return { status: response.status, message: text.includes(NOT_FOUND_MESSAGE) ? NOT_FOUND_MESSAGE : text.slice(0, 80) };
}

describe("access to every address with data", () => {
  it("sends a visitor to sign in first, before anything is looked up", async () => {
    const visitor = client(inject("appUrl"));
    for (const a of ADDRESSES(world))
      for (const id of [a.mine, a.theirs, NOTHING, "nonsense"]) {
        const response = await visitor.fetch(a.path(id));
        if (a.what === "project data") {
          // The app's scripts get the redirect as data (202 with the target), as the framework sends it.
          expect(response.status, a.what).toBe(202);
          continue;
        }
        if (a.what.startsWith("API")) {
          // The API asks for credentials instead of sending anyone to a page.
          expect(response.status, `${a.what} ${id}`).toBe(401);
          continue;
        }
        expect(response.status, `${a.what} ${id}`).toBe(302);
        expect(response.headers.get("Location"), a.what).toBe(`/sign-in?next=${encodeURIComponent(a.path(id))}`);
      }
  });

  it("gives an outsider the very answer an id of nothing, or a malformed one, gets: 404 with the one message", async () => {
    for (const a of ADDRESSES(world)) {
      const answers = [];
      for (const id of [a.theirs, NOTHING, "nonsense", `${NOTHING.slice(0, -1)}x`, "%00", "..%2F..%2Fetc"])
        answers.push({ id, ...(await answer(await world.as.owner.fetch(a.path(id)))) });
      for (const x of answers) {
        expect(x.status, `${a.what} ${x.id}`).toBe(404);
        if (a.what !== "project data") expect(x.message, `${a.what} ${x.id}`).toBe(NOT_FOUND_MESSAGE);
      }
      // The stranger, who owns the foreign things, reads them; the owner of this world is the outsider there.
      expect((await world.as.stranger.fetch(a.path(a.theirs))).status, a.what).toBe(200);
    }
  });

  it("lets every member read, whatever their role", async () => {
    for (const person of [world.as.owner, world.as.editor, world.as.viewer])
      for (const a of ADDRESSES(world)) {
        const response = await person.fetch(a.path(a.mine));
        expect(response.status, a.what).toBe(200);
        if (a.what === "sprite image") expect(response.headers.get("Content-Type")).toBe("image/png");
        if (a.what === "effect document") expect(((await response.json()) as { format: string }).format).toBe("skewsmith.effect/1");
      }
  });

  it("lets nobody write to a file: a POST is refused, and a former member loses access at once", async () => {
    for (const a of ADDRESSES(world).filter((x) => x.file)) {
      const response = await world.as.owner.post(a.path(a.mine), {});
      expect(response.status, a.what).toBe(405);
    }
    // The viewer leaves the team: their next request for its files is the outsider's 404.
    const left = await world.as.viewer.post(`/teams/${world.team.id}`, { intent: "leave-team" });
    expect(left.status).toBe(302);
    for (const a of ADDRESSES(world).filter((x) => x.file)) {
      const after = await answer(await world.as.viewer.fetch(a.path(a.mine)));
      expect(after, a.what).toEqual({ status: 404, message: NOT_FOUND_MESSAGE });
    }
  });
});
