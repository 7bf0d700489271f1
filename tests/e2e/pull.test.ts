/**
 * `skewsmith pull` against the started app on 127.0.0.1: the first pull, the unchanged case (304), changes, a whole
 * project, and every failure (bad token, unknown id, server down, broken or hostile zips, bad options), each a one-line
 * reason and a non-zero exit with the folder left as it was.
 */
import { execFile } from "node:child_process";
import { createHash } from "node:crypto";
import { mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, writeFileSync } from "node:fs";
import { createServer, type Server, type ServerResponse } from "node:http";
import { tmpdir } from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { zipSync } from "fflate";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createDb } from "../../app/db/client.server.ts";
import type { EffectRow, Project, User } from "../../app/db/schema.ts";
import { createApiToken, revokeApiToken } from "../../app/models/apiTokens.server.ts";
import { saveEffectDocument } from "../../app/models/effects.server.ts";
import { makeEffect, makeProject, makeTargetProfile, makeTeam, makeUser } from "../factories.ts";
import { appUrl } from "./support.ts";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../..");
const BIN = path.join(ROOT, "node_modules/.bin/skewsmith");
const db = createDb(process.env.DATABASE_URL!, { max: 2 });

const DOC = { canvas: { width: 24, height: 16 }, pivot: { x: 12, y: 8 }, angles: { sweep: { from: 0, to: 90, frames: 6 } } };

let owner: User;
let project: Project;
let effect: EffectRow;
let lopsided: EffectRow;
let foreign: EffectRow;
let token: string;
let work: string;

function pull(args: string[], env: Record<string, string> = {}): Promise<{ code: number; stdout: string; stderr: string }> {
  return new Promise((resolve) => {
    execFile(
      BIN,
      ["pull", ...args],
      { cwd: work, encoding: "utf8", env: { ...process.env, SKEWSMITH_TOKEN: token, SKEWSMITH_URL: "", ...env } },
      (error, stdout, stderr) => resolve({ code: error ? (typeof error.code === "number" ? error.code : -1) : 0, stdout, stderr }),
    );
  });
}

/** Every file under `dir` with its SHA-256 and modification time, to show a folder did not change. */
function snapshot(dir: string): Record<string, string> {
  const out: Record<string, string> = {};
  const walk = (d: string) => {
    for (const name of readdirSync(d)) {
      const p = path.join(d, name);
      if (statSync(p).isDirectory()) walk(p);
      else out[path.relative(dir, p)] = `${createHash("sha256").update(readFileSync(p)).digest("hex")} ${statSync(p).mtimeMs}`;
    }
  };
  walk(dir);
  return out;
}

/** A failure: exit 1 (or 2 for usage), exactly one line on stderr naming the reason, nothing on stdout. */
function expectFailure(run: { code: number; stdout: string; stderr: string }, reason: RegExp, code = 1) {
  expect(run.code, run.stderr).toBe(code);
  expect(run.stdout).toBe("");
  expect(run.stderr.trimEnd().split("\n"), run.stderr).toHaveLength(1);
  expect(run.stderr).toMatch(/^skewsmith pull: /);
  expect(run.stderr).toMatch(reason);
}

/** No temporary or old folder of a pull is left beside `dir`. */
function expectNoLeftovers(dir: string) {
  const base = path.basename(dir);
  expect(readdirSync(path.dirname(dir)).filter((n) => n.startsWith(`.${base}.`))).toEqual([]);
}

let fake: Server;
let fakeUrl: string;
let fakeAnswer: (res: ServerResponse) => void = (res) => res.end();

beforeAll(async () => {
  owner = await makeUser(db);
  const stranger = await makeUser(db);
  const team = await makeTeam(db, { owner });
  const theirs = await makeTeam(db, { owner: stranger });
  project = await makeProject(db, { team, actor: owner, name: "Pull quay" });
  const profile = await makeTargetProfile(db, { team, labelPrefix: "quay", dialects: ["6502", "c"] });
  effect = await makeEffect(db, { project, actor: owner, name: "Beacon", document: DOC, targetProfile: profile });
  lopsided = await makeEffect(db, { project, actor: owner, name: "Lopsided", document: { ...DOC, pivot: { x: 3, y: 2.5 } } });
  foreign = await makeEffect(db, { project: await makeProject(db, { team: theirs, actor: stranger }), actor: stranger, document: DOC });
  token = (await createApiToken(db, { userId: owner.id, name: "pull", scope: "read", expiresAt: null })).token;
  work = mkdtempSync(path.join(tmpdir(), "skewsmith-pull-"));
  fake = createServer((_req, res) => fakeAnswer(res));
  await new Promise<void>((resolve) => fake.listen(0, "127.0.0.1", resolve));
  fakeUrl = `http://127.0.0.1:${(fake.address() as { port: number }).port}`;
});
afterAll(async () => {
  await new Promise((resolve) => fake?.close(resolve));
  rmSync(work, { recursive: true, force: true });
  await db.$client.end();
});

describe("skewsmith pull", () => {
  it("unpacks the effect's bundle, skips the download while nothing changed, and pulls again after a save", async () => {
    const out = path.join(work, "tables");
    const first = await pull(["--server", appUrl(), "--effect", effect.id, "--out", out]);
    expect(first.code, first.stderr).toBe(0);
    expect(first.stderr).toMatch(/^skewsmith pull: 5 files, \d+ bytes, from http:\/\/127\.0\.0\.1:\d+ into /);
    // The profile's label prefix before the effect's own label, and its dialects: the same files as the app's own download.
    expect(readdirSync(out).sort()).toEqual([
      ".skewsmith-pull.json",
      "README.txt",
      "quay_beacon.6502.s",
      "quay_beacon.c",
      "quay_beacon.effect.json",
      "quay_beacon.h",
    ]);
    expect(first.stdout.trim().split("\n")).toHaveLength(5);
    const download = await fetch(`${appUrl()}/api/v1/effects/${effect.id}/export.zip`, { headers: { Authorization: `Bearer ${token}` } });
    const state = JSON.parse(readFileSync(path.join(out, ".skewsmith-pull.json"), "utf8"));
    expect(state.etag).toBe(download.headers.get("ETag"));
    expect(state.source).toBe(`${appUrl()}/api/v1/effects/${effect.id}/export.zip`);
    expect(JSON.stringify(state)).not.toContain(token);
    expectNoLeftovers(out);

    const before = snapshot(out);
    const again = await pull(["--server", appUrl(), "--effect", effect.id, "--out", out]);
    expect(again.code).toBe(0);
    expect(again.stderr).toBe(`skewsmith pull: ${out} is up to date (the effect has not changed since the last pull)\n`);
    expect(again.stdout).toBe("");
    expect(snapshot(out)).toEqual(before);

    // A file removed by hand: the pull notices and downloads the whole bundle again instead of trusting the ETag.
    rmSync(path.join(out, "quay_beacon.h"));
    const repaired = await pull(["--server", appUrl(), "--effect", effect.id, "--out", out]);
    expect(repaired.stderr).toContain("5 files");
    expect(readFileSync(path.join(out, "quay_beacon.h"), "utf8")).toContain("quay_beacon_FRAMES 6");

    await saveEffectDocument(db, {
      effectId: effect.id,
      expectedVersion: 1,
      actorId: owner.id,
      document: { ...DOC, angles: { list: [0, 45] } },
    });
    const changed = await pull(["--server", appUrl(), "--effect", effect.id, "--out", out]);
    expect(changed.code).toBe(0);
    expect(changed.stderr).toContain("5 files");
    expect(readFileSync(path.join(out, "quay_beacon.h"), "utf8")).toContain("quay_beacon_FRAMES 2");

    // Other options are another bundle: downloaded, not "up to date".
    const options = await pull(["--server", appUrl(), "--effect", effect.id, "--out", out, "--outputs", "json", "--label", "lamp"]);
    expect(options.code, options.stderr).toBe(0);
    expect(readdirSync(out).sort()).toEqual([".skewsmith-pull.json", "README.txt", "lamp.effect.json", "lamp.json"]);
    expectNoLeftovers(out);
  });

  it("pulls a whole project, one folder per effect, with the token from --token and the server from SKEWSMITH_URL", async () => {
    const out = path.join(work, "project");
    const run = await pull(["--token", token, "--project", project.id, "--out", out, "--outputs", "c"], {
      SKEWSMITH_TOKEN: "",
      SKEWSMITH_URL: appUrl(),
    });
    expect(run.code, run.stderr).toBe(0);
    expect(readdirSync(out).sort()).toEqual([".skewsmith-pull.json", "README.txt", "lopsided", "quay_beacon"]);
    expect(readdirSync(path.join(out, "quay_beacon")).sort()).toEqual([
      "README.txt",
      "quay_beacon.c",
      "quay_beacon.effect.json",
      "quay_beacon.h",
    ]);
    const again = await pull(["--token", token, "--project", project.id, "--out", out, "--outputs", "c"], {
      SKEWSMITH_TOKEN: "",
      SKEWSMITH_URL: appUrl(),
    });
    expect(again.stderr).toContain("is up to date (the project has not changed");
  });

  describe("failures leave the folder as it was", () => {
    let out: string;
    let before: Record<string, string>;
    beforeAll(async () => {
      out = path.join(work, "kept");
      const ok = await pull(["--server", appUrl(), "--effect", effect.id, "--out", out, "--outputs", "c"]);
      expect(ok.code, ok.stderr).toBe(0);
      before = snapshot(out);
    });
    const args = (extra: string[] = []) => [
      "--server",
      appUrl(),
      "--effect",
      effect.id,
      "--out",
      out,
      "--outputs",
      "c",
      "--force",
      ...extra,
    ];
    const unchanged = () => {
      expect(snapshot(out)).toEqual(before);
      expectNoLeftovers(out);
    };

    it("a wrong, revoked or missing token", async () => {
      expectFailure(
        await pull(args(), { SKEWSMITH_TOKEN: `sks_${"x".repeat(43)}` }),
        /the server refused the token: This API token is not valid/,
      );
      const revoked = await createApiToken(db, { userId: owner.id, name: "revoked pull", scope: "read", expiresAt: null });
      await revokeApiToken(db, { userId: owner.id, tokenId: revoked.item.id });
      expectFailure(await pull(args(), { SKEWSMITH_TOKEN: revoked.token }), /the server refused the token: This API token was revoked/);
      expectFailure(await pull(args(), { SKEWSMITH_TOKEN: "" }), /an API token is required/, 2);
      unchanged();
    });

    it("an unknown id, someone else's effect, and a malformed id", async () => {
      const missing = await pull(["--server", appUrl(), "--effect", "00000000-0000-4000-8000-000000000000", "--out", out, "--force"]);
      expectFailure(missing, /no such effect: There is nothing here, or it belongs to a team you are not in\./);
      const theirs = await pull(["--server", appUrl(), "--effect", foreign.id, "--out", out, "--force"]);
      expect(theirs.stderr).toBe(missing.stderr);
      expectFailure(await pull(["--server", appUrl(), "--effect", "../teams", "--out", out]), /--effect: "\.\.\/teams" is not allowed/, 2);
      unchanged();
    });

    it("the server down or not a Skewsmith", async () => {
      const closed = createServer();
      await new Promise<void>((resolve) => closed.listen(0, "127.0.0.1", resolve));
      const port = (closed.address() as { port: number }).port;
      await new Promise((resolve) => closed.close(resolve));
      expectFailure(
        await pull(["--server", `http://127.0.0.1:${port}`, "--effect", effect.id, "--out", out, "--force"]),
        /cannot reach http:\/\/127\.0\.0\.1:\d+: connection refused/,
      );
      fakeAnswer = (res) => {
        res.writeHead(200, { "Content-Type": "text/html" });
        res.end("<html><body>Welcome to the proxy</body></html>");
      };
      expectFailure(
        await pull(["--server", fakeUrl, "--effect", effect.id, "--out", out, "--force"]),
        /answered with text\/html, not a zip/,
      );
      fakeAnswer = (res) => {
        res.writeHead(302, { Location: "https://elsewhere.example/" });
        res.end();
      };
      expectFailure(
        await pull(["--server", fakeUrl, "--effect", effect.id, "--out", out, "--force"]),
        /redirected to https:\/\/elsewhere\.example\//,
      );
      fakeAnswer = (res) => {
        res.writeHead(500, { "Content-Type": "application/json" });
        res.end(JSON.stringify({ error: { message: "database\nis down", field: null } }));
      };
      expectFailure(
        await pull(["--server", fakeUrl, "--effect", effect.id, "--out", out, "--force"]),
        /the server answered 500: database is down$/m,
      );
      expectFailure(
        await pull(["--server", "ftp://127.0.0.1/", "--effect", effect.id, "--out", out]),
        /--server: "ftp:\/\/127\.0\.0\.1\/" is not allowed/,
        2,
      );
      unchanged();
    });

    it("a broken, truncated, damaged or hostile zip", async () => {
      const serve = (body: Uint8Array, headers: Record<string, string> = {}) => {
        fakeAnswer = (res) => {
          res.writeHead(200, { "Content-Type": "application/zip", "Content-Length": String(body.length), ...headers });
          res.end(body);
        };
      };
      const fromFake = () => pull(["--server", fakeUrl, "--effect", effect.id, "--out", out, "--force"]);
      serve(new TextEncoder().encode("PK this is not a zip at all"));
      expectFailure(await fromFake(), /the server's answer is not a valid zip/);
      const good = zipSync({ "quay.h": new TextEncoder().encode("#define X 1\n") });
      serve(good.slice(0, good.length - 10));
      expectFailure(await fromFake(), /not a valid zip/);
      serve(good, { "Content-Digest": `sha-256=:${createHash("sha256").update("other bytes").digest("base64")}:` });
      expectFailure(await fromFake(), /the download is damaged/);
      for (const name of ["../escape.h", "/etc/passwd", "a/../../b.h", "C:\\x.h", ".skewsmith-pull.json"]) {
        serve(zipSync({ [name]: new Uint8Array([1]), "ok.h": new Uint8Array([2]) }));
        expectFailure(await fromFake(), /refusing the bundle: the bundle holds/);
      }
      serve(zipSync({ "Quay.h": new Uint8Array([1]), "quay.h": new Uint8Array([2]) }));
      expectFailure(await fromFake(), /apart from case/);
      fakeAnswer = (res) => {
        res.writeHead(200, { "Content-Type": "application/zip", "Content-Length": "100000" });
        res.end(good);
      };
      expectFailure(await fromFake(), /stopped after|cannot reach/);
      expect(readdirSync(path.dirname(out)).some((n) => n.includes("escape"))).toBe(false);
      unchanged();
    });

    it("bad options, locally or as the server sees them", async () => {
      expectFailure(
        await pull(args(["--outputs", "c,pascal"])),
        /--outputs: "pascal" is not allowed; allowed a comma-separated list of/,
        2,
      );
      expectFailure(await pull(args(["--label", "int"])), /--label: "int" is not allowed \(a C or C\+\+ keyword\)/, 2);
      expectFailure(await pull(args(["--split", "--no-split"])), /--split and --no-split contradict each other/, 2);
      expectFailure(await pull(["--server", appUrl(), "--out", out]), /give one of --effect ID or --project ID/, 2);
      const half = await pull(["--server", appUrl(), "--effect", lopsided.id, "--out", out, "--half"]);
      expectFailure(half, /the server refused the options: Lopsided: half/);
      unchanged();
    });

    it("a folder that skewsmith pull did not make", async () => {
      const mine = path.join(work, "src");
      mkdirSync(mine);
      writeFileSync(path.join(mine, "main.c"), "int main(void) { return 0; }\n");
      const mineBefore = snapshot(mine);
      expectFailure(
        await pull(["--server", appUrl(), "--effect", effect.id, "--out", mine]),
        /holds files that skewsmith pull did not put there/,
      );
      expect(snapshot(mine)).toEqual(mineBefore);
      expectNoLeftovers(mine);
    });
  });
});
