/**
 * The checks that help the next person change the code, run with every other test: the type check of
 * the app and of the core package, eslint (TypeScript and React hooks rules) and prettier's format check.
 * Each fails on any error and prints what the tool printed.
 */
import { spawnSync } from "node:child_process";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
const bin = (name: string) => path.join(ROOT, "node_modules/.bin", name);

function run(command: string, args: string[]): { status: number | null; output: string } {
  const result = spawnSync(command, args, { cwd: ROOT, encoding: "utf8", maxBuffer: 64 * 1024 * 1024 });
  return { status: result.status, output: `${result.stdout ?? ""}${result.stderr ?? ""}`.slice(-20_000) };
}

describe("static checks", () => {
  // Beside the browser tests on two cores, the type check of the whole app took up to five minutes in a full run.
  it("the app and the core package type-check (react-router typegen, then tsc --noEmit)", { timeout: 420_000 }, () => {
    const typegen = run(bin("react-router"), ["typegen"]);
    expect(typegen.status, typegen.output).toBe(0);
    const app = run(bin("tsc"), ["--noEmit", "-p", "tsconfig.json"]);
    expect(app.status, app.output).toBe(0);
    const core = run(bin("tsc"), ["--noEmit", "-p", "packages/core/tsconfig.json"]);
    expect(core.status, core.output).toBe(0);
  });

  it("eslint finds no error", { timeout: 180_000 }, () => {
    const lint = run(bin("eslint"), ["--max-warnings", "0", "."]);
    expect(lint.status, lint.output).toBe(0);
  });

  it("every file is formatted as prettier formats it", { timeout: 120_000 }, () => {
    const format = run(bin("prettier"), ["--check", "."]);
    expect(format.status, format.output).toBe(0);
  });
});
