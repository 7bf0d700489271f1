/**
 * docs/examples/Makefile run with make against the started app: it pulls an effect's tables, assembles the 6502
 * source with ca65 (from Debian's cc65) and builds a C program against the C tables with gcc. The program prints the
 * tables it was linked with, which must be core's tables for the saved document; a second make pulls nothing and
 * rebuilds nothing; after a save, make pulls and rebuilds.
 */
import { execFile } from "node:child_process";
import { cpSync, mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { compileShifts, parseEffect } from "@skewsmith/core";
import { afterAll, describe, expect, it } from "vitest";
import { createDb } from "../../app/db/client.server.ts";
import { createApiToken } from "../../app/models/apiTokens.server.ts";
import { saveEffectDocument } from "../../app/models/effects.server.ts";
import { makeEffect, makeProject, makeTargetProfile, makeTeam, makeUser } from "../factories.ts";
import { appUrl } from "./support.ts";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../..");
const db = createDb(process.env.DATABASE_URL!, { max: 2 });
afterAll(() => db.$client.end());

function run(file: string, args: string[], cwd: string, env: Record<string, string> = {}) {
  return new Promise<{ code: number; stdout: string; stderr: string }>((resolve) => {
    execFile(file, args, { cwd, encoding: "utf8", env: { ...process.env, ...env }, maxBuffer: 16 << 20 }, (error, stdout, stderr) =>
      resolve({ code: error ? (typeof error.code === "number" ? error.code : -1) : 0, stdout, stderr }),
    );
  });
}

/** What build/check prints for a document, computed by core here: the tables the program must have been linked with. */
function expectedOutput(document: unknown): string {
  const effect = parseEffect(document);
  const { frames } = compileShifts(effect);
  const lines = [`frames ${frames.length} width ${effect.canvas.width} height ${effect.canvas.height}`];
  frames.forEach((f, i) => lines.push(`frame ${i} flip ${f.flip ? 1 : 0} h ${Array.from(f.h).join(" ")} v ${Array.from(f.v).join(" ")}`));
  return `${lines.join("\n")}\n`;
}

describe("docs/examples/Makefile", () => {
  it("pulls the tables, assembles them with ca65, builds the C with gcc, and rebuilds only after a change", async () => {
    const owner = await makeUser(db);
    const team = await makeTeam(db, { owner });
    const project = await makeProject(db, { team, actor: owner });
    // The profile's own label and dialects are overridden by the Makefile's --label fx --outputs c,6502.
    const profile = await makeTargetProfile(db, { team, labelPrefix: "quay", dialects: ["z80"] });
    const first = { canvas: { width: 32, height: 24 }, pivot: { x: 16, y: 12 }, angles: { sweep: { from: 0, to: 360, frames: 16 } } };
    const effect = await makeEffect(db, { project, actor: owner, document: first, targetProfile: profile });
    const token = (await createApiToken(db, { userId: owner.id, name: "make", scope: "read", expiresAt: null })).token;

    const dir = mkdtempSync(path.join(tmpdir(), "skewsmith-make-"));
    try {
      cpSync(path.join(ROOT, "docs/examples"), dir, { recursive: true });
      const env = { SKEWSMITH_URL: appUrl(), SKEWSMITH_TOKEN: token };
      const make = () => run("make", [`SKEWSMITH=${path.join(ROOT, "node_modules/.bin/skewsmith")}`, `EFFECT=${effect.id}`], dir, env);

      const built = await make();
      expect(built.code, built.stdout + built.stderr).toBe(0);
      expect(built.stdout).toMatch(/^ca65 -o build\/fx\.6502\.o tables\/fx\.6502\.s$/m);
      expect(built.stdout).toMatch(/^gcc .*-Werror.* -c -o build\/fx\.o tables\/fx\.c$/m);
      // The ca65 object exports the tables under the label asked for (od65 is the cc65 suite's object dumper).
      const exports = await run("od65", ["--dump-exports", "build/fx.6502.o"], dir);
      for (const name of ["fx_h", "fx_v", "fx_flip", "fx_alpha", "fx_beta", "fx_FRAMES"]) expect(exports.stdout).toContain(`"${name}"`);
      expect((await run("./build/check", [], dir)).stdout).toBe(expectedOutput(first));

      const again = await make();
      expect(again.code).toBe(0);
      expect(again.stderr).toContain("tables is up to date");
      expect(again.stdout).not.toMatch(/^(ca65|gcc) /m);

      const second = { ...first, pivot: { x: 15.5, y: 12 }, angles: { list: [0, 10, 20, -30] }, edges: "clip" };
      await saveEffectDocument(db, { effectId: effect.id, expectedVersion: 1, actorId: owner.id, document: second });
      const rebuilt = await make();
      expect(rebuilt.code, rebuilt.stdout + rebuilt.stderr).toBe(0);
      expect(rebuilt.stdout).toMatch(/^ca65 /m);
      expect(rebuilt.stdout).toMatch(/^gcc /m);
      expect((await run("./build/check", [], dir)).stdout).toBe(expectedOutput(second));

      // Without an effect id, make stops with a plain reason.
      const missing = await run("make", [`SKEWSMITH=${path.join(ROOT, "node_modules/.bin/skewsmith")}`], dir, env);
      expect(missing.code).not.toBe(0);
      expect(missing.stderr).toContain("set EFFECT=<effect id>");
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
