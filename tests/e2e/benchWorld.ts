/** People, a team, a project, a sprite and an effect of a browser test's own, for the bench's tests. */
import { encodePng, parseEffect, placeImage, type IndexedImage } from "@skewsmith/core";
import type { Page } from "playwright-core";
import { expect } from "vitest";
import type { Db } from "../../app/db/client.server.ts";
import { compassRose } from "../../app/demo/art.ts";
import { makeEffect, makeProject, makeSprite, makeTeam, makeUser, unique } from "../factories.ts";

export async function benchWorld(db: Db, document: unknown, options: { sprite?: boolean; spriteImage?: IndexedImage } = {}) {
  const editor = await makeUser(db);
  const other = await makeUser(db);
  const viewer = await makeUser(db);
  const team = await makeTeam(db, {
    owner: editor,
    members: [
      { user: other, role: "editor" },
      { user: viewer, role: "viewer" },
    ],
  });
  const project = await makeProject(db, { team, actor: editor });
  const image = options.spriteImage ?? compassRose(16);
  const sprite = await makeSprite(db, { project, actor: editor, name: `rose-${unique()}.png`, image });
  const effect = await makeEffect(db, { project, actor: editor, document, sprite: options.sprite ? sprite : undefined });
  return { editor, other, viewer, team, project, sprite, image, effect, doc: parseEffect(document) };
}

/** The canvas-sized picture the bench turns: the sprite placed with its top-left pixel at (x, y), as a PNG. */
export function placedPng(image: IndexedImage, width: number, height: number, x: number, y: number): Uint8Array {
  return encodePng(placeImage(image, width, height, x, y));
}

/** Waits until the bench's table holds `frames` measured rows. */
export async function waitForTable(page: Page, frames: number): Promise<void> {
  await expect.poll(() => page.getByTestId("frame-table").locator("tbody tr").count()).toBe(frames);
  await expect.poll(() => page.locator("#frame-table-heading").textContent()).not.toContain("measuring");
}

/** The drawing buffer's size of the preview canvas. */
export function bufferSize(page: Page): Promise<[number, number]> {
  return page.getByRole("img", { name: "Frame preview" }).evaluate((c: HTMLCanvasElement) => [c.width, c.height]);
}

/** The preview's pixels as RGBA bytes (at zoom 1 these are the frame's own pixels). */
export function canvasPixels(page: Page): Promise<number[]> {
  return page
    .getByRole("img", { name: "Frame preview" })
    .evaluate((c: HTMLCanvasElement) => Array.from(c.getContext("2d")!.getImageData(0, 0, c.width, c.height).data));
}
