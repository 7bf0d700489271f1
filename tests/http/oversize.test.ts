/**
 * A body over a route's limit is refused with a 413 the client can read: the server drops what it did not read (up
 * to a bound) and keeps the connection, instead of cutting it while the client is still sending, which a client sees
 * as a reset and not as an answer. Far over the bound, the connection may be cut, and the server serves on.
 */
import { connect } from "node:net";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { createDb } from "../../app/db/client.server.ts";
import { SPRITE_FORM_MAX_BYTES } from "../../app/sprites/forms.ts";
import { makeWorld, type World } from "../support/world.ts";

const db = createDb(process.env.DATABASE_URL!, { max: 2 });
let world: World;
beforeAll(async () => {
  world = await makeWorld(db, inject("appUrl"), inject("githubUrl"));
});
afterAll(() => db.$client.end());

const upload = (bytes: number) =>
  world.as.owner.fetch(`/projects/${world.project.id}/sprites`, {
    method: "POST",
    headers: { "Content-Type": "application/x-www-form-urlencoded" },
    body: `intent=upload-sprite&name=Too+big&pad=${"x".repeat(bytes)}`,
  });

/**
 * On one raw connection: the head and a first piece of an oversized upload, then (once the 413 has arrived) the rest
 * of the body in pieces, then a second request. Returns what the connection received and whether writing failed.
 */
function oversizeThenAnother(bodyBytes: number): Promise<{ text: string; writeFailed: boolean }> {
  const url = new URL(inject("appUrl") as string);
  const path = `/projects/${world.project.id}/sprites`;
  const head =
    `POST ${path} HTTP/1.1\r\nHost: ${url.host}\r\nOrigin: ${url.origin}\r\nCookie: ${world.as.owner.jar.header()}\r\n` +
    `Content-Type: application/x-www-form-urlencoded\r\nContent-Length: ${bodyBytes}\r\n\r\n`;
  const piece = Buffer.alloc(64 * 1024, "x");
  return new Promise((resolve) => {
    let text = "";
    let writeFailed = false;
    let sentRest = false;
    const socket = connect(Number(url.port), url.hostname, () => {
      socket.write(head);
      socket.write(piece);
    });
    const finish = () => resolve({ text, writeFailed });
    socket.on("error", () => {
      writeFailed = true;
      finish();
    });
    socket.on("close", finish);
    socket.on("data", async (chunk) => {
      text += chunk.toString("latin1");
      if (sentRest || !/^HTTP\/1\.1 413/.test(text) || !text.includes("\r\n\r\n")) return;
      sentRest = true;
      for (let sent = piece.length; sent < bodyBytes; sent += piece.length) {
        const n = Math.min(piece.length, bodyBytes - sent);
        if (!socket.write(n === piece.length ? piece : piece.subarray(0, n))) await new Promise((r) => socket.once("drain", r));
        if (socket.destroyed) return;
      }
      socket.write(`GET /healthz HTTP/1.1\r\nHost: ${url.host}\r\nConnection: close\r\n\r\n`);
    });
    setTimeout(() => socket.destroy(), 20_000).unref();
  });
}

describe("a body over the limit", () => {
  it("just over the sprite form's limit gets a readable 413, every time", async () => {
    for (let i = 0; i < 4; i++) {
      const response = await upload(SPRITE_FORM_MAX_BYTES + 1024);
      expect(response.status).toBe(413);
      expect(await response.text()).toMatch(/larger than \d+ bytes/);
    }
  });

  it("answers 413 before the body is in, keeps reading the rest, and serves the next request on the same connection", async () => {
    const { text, writeFailed } = await oversizeThenAnother(SPRITE_FORM_MAX_BYTES + 256 * 1024);
    expect(writeFailed).toBe(false);
    expect(text).toMatch(/^HTTP\/1\.1 413/);
    // The second answer on the same connection: the health check's.
    expect(text.match(/HTTP\/1\.1 \d{3}/g)).toEqual(["HTTP/1.1 413", "HTTP/1.1 200"]);
  });

  it("far over every bound may be cut off, and the server answers the next request", async () => {
    const outcome = await upload(64 * 1024 * 1024).then(
      (r) => r.status,
      () => "cut",
    );
    expect([413, "cut"]).toContain(outcome);
    expect((await world.as.owner.fetch(`/projects/${world.project.id}`)).status).toBe(200);
  });
});
