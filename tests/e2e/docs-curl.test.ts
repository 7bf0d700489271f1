/**
 * The curl examples of docs/api.md, run as written with real curl against the started app: the shell fills in
 * $SKEWSMITH_URL, $SKEWSMITH_TOKEN and the ids from the environment this test gives it. Where the reference shows an
 * answer, the real answer must have every key the shown one has.
 */
import { execFile } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { unzipSync } from "fflate";
import { afterAll, describe, expect, it } from "vitest";
import { createDb } from "../../app/db/client.server.ts";
import { createApiToken } from "../../app/models/apiTokens.server.ts";
import { getEffect } from "../../app/models/effects.server.ts";
import { makeEffect, makeProject, makeTargetProfile, makeTeam, makeUser } from "../factories.ts";
import { sessionCookie } from "./session.ts";
import { appUrl } from "./support.ts";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../..");
const REFERENCE = readFileSync(path.join(ROOT, "docs/api.md"), "utf8");
const db = createDb(process.env.DATABASE_URL!, { max: 2 });
afterAll(() => db.$client.end());

interface Example {
  command: string;
  /** The answer the reference shows right after the command, if any. */
  shown: unknown;
}

/** Every curl command in a ```sh block, with the ```json block that follows it when nothing but blank lines is between. */
function examples(markdown: string): Example[] {
  const fence = /```(\w*)\n([\s\S]*?)```/g;
  const blocks: { lang: string; body: string; start: number; end: number }[] = [];
  for (let m = fence.exec(markdown); m; m = fence.exec(markdown))
    blocks.push({ lang: m[1], body: m[2], start: m.index, end: m.index + m[0].length });
  const out: Example[] = [];
  blocks.forEach((block, i) => {
    if (block.lang !== "sh") return;
    const commands = block.body
      .replace(/\\\n\s*/g, " ")
      .split("\n")
      .map((l) => l.trim())
      .filter((l) => l.startsWith("curl "));
    const next = blocks[i + 1];
    const shown = next && next.lang === "json" && markdown.slice(block.end, next.start).trim() === "" ? JSON.parse(next.body) : undefined;
    commands.forEach((command, k) => out.push({ command, shown: k === commands.length - 1 ? shown : undefined }));
  });
  return out;
}

/** Every key of `shown` is in `actual`, at every depth (arrays: their first items), with values of the same type. */
function expectShape(actual: unknown, shown: unknown, at = "answer"): void {
  if (Array.isArray(shown)) {
    expect(Array.isArray(actual), at).toBe(true);
    if (shown.length > 0 && (actual as unknown[]).length > 0) expectShape((actual as unknown[])[0], shown[0], `${at}[0]`);
    return;
  }
  if (shown !== null && typeof shown === "object") {
    expect(actual !== null && typeof actual === "object" && !Array.isArray(actual), at).toBe(true);
    for (const [key, value] of Object.entries(shown)) {
      expect(Object.keys(actual as object), `${at} lacks ${key}`).toContain(key);
      expectShape((actual as Record<string, unknown>)[key], value, `${at}.${key}`);
    }
    return;
  }
  // Nullable fields (a sprite, a last use) may be null in one answer and set in another.
  if (shown !== null && actual !== null) expect(typeof actual, at).toBe(typeof shown);
}

function bash(command: string, cwd: string, env: Record<string, string>): Promise<{ code: number; stdout: string; stderr: string }> {
  return new Promise((resolve) => {
    execFile(
      "bash",
      ["-c", command],
      { cwd, env: { ...process.env, ...env }, encoding: "utf8", maxBuffer: 16 << 20 },
      (error, stdout, stderr) => resolve({ code: error ? (typeof error.code === "number" ? error.code : -1) : 0, stdout, stderr }),
    );
  });
}

describe("docs/api.md", () => {
  it("documents every address of the API", () => {
    const routes = readFileSync(path.join(ROOT, "app/routes.ts"), "utf8");
    const addresses = [...routes.matchAll(/route\("(api\/v1[^"]*)"/g)].map((m) => m[1]).filter((a) => !a.endsWith("*"));
    expect(addresses.length).toBeGreaterThanOrEqual(10);
    for (const address of addresses) expect(REFERENCE, address).toContain(`/${address}`);
  });

  it("has curl examples that run as written against the app and answer what the reference shows", async () => {
    const owner = await makeUser(db);
    const team = await makeTeam(db, { owner, name: `Docs quay ${owner.login.slice(-6)}` });
    const project = await makeProject(db, { team, actor: owner, name: "Docs project" });
    const profile = await makeTargetProfile(db, { team, labelPrefix: "doc", dialects: ["6502"] });
    const effect = await makeEffect(db, {
      project,
      actor: owner,
      name: "Beacon",
      targetProfile: profile,
      document: { canvas: { width: 32, height: 32 }, pivot: { x: 16, y: 16 }, angles: { sweep: { from: 0, to: 360, frames: 64 } } },
    });
    const token = (await createApiToken(db, { userId: owner.id, name: "docs", scope: "write", expiresAt: null })).token;
    const spare = (await createApiToken(db, { userId: owner.id, name: "to revoke", scope: "read", expiresAt: null })).item;
    const env = {
      SKEWSMITH_URL: appUrl(),
      SKEWSMITH_TOKEN: token,
      SKEWSMITH_SESSION: await sessionCookie(owner),
      TEAM_ID: team.id,
      PROJECT_ID: project.id,
      EFFECT_ID: effect.id,
      TOKEN_ID: spare.id,
    };

    const list = examples(REFERENCE);
    expect(list.length).toBeGreaterThanOrEqual(12);
    expect(list.filter((e) => e.shown !== undefined).length).toBeGreaterThanOrEqual(9);
    const dir = mkdtempSync(path.join(tmpdir(), "skewsmith-docs-curl-"));
    try {
      for (const example of list) {
        const run = await bash(example.command, dir, env);
        expect(run.code, `${example.command}\n${run.stderr}${run.stdout}`).toBe(0);
        if (example.shown !== undefined) expectShape(JSON.parse(run.stdout), example.shown);
        else if (!example.command.includes(" -o ")) expect(run.stdout.trim(), example.command).not.toBe("");
      }
      // The PUT example saved a new version; the downloads are zips with the options they asked for.
      expect((await getEffect(db, effect.id))!.version).toBe(2);
      expect(Object.keys(unzipSync(readFileSync(path.join(dir, "beacon.zip")))).sort()).toEqual([
        "README.txt",
        "beacon.6502.s",
        "beacon.c",
        "beacon.effect.json",
        "beacon.h",
      ]);
      expect(Object.keys(unzipSync(readFileSync(path.join(dir, "quay.zip"))))).toContain("doc_beacon/doc_beacon.c");

      // The conditional download, run again, gets 304: curl keeps the zip and says so with the status.
      const conditional = list.find((e) => e.command.includes("--etag-compare"))!;
      expect(existsSync(path.join(dir, "beacon.etag"))).toBe(true);
      const again = await bash(`${conditional.command} -w '%{http_code}'`, dir, env);
      expect(again.stdout).toBe("304");
      expect(existsSync(path.join(dir, "beacon.zip"))).toBe(true);

      // The revoke example revoked the spare token.
      const spareNow = await fetch(`${appUrl()}/api/v1/tokens/${spare.id}`, { headers: { Authorization: `Bearer ${token}` } });
      expect((await spareNow.json()).state).toBe("revoked");
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
