/**
 * No secret reaches the browser: the client bundles (everything under the build's client folder) hold neither the
 * values of the secrets that were in the environment when the app was built (scripts/test sets them), nor the
 * database URL or its password, nor the names of the server's settings (a sign that server code was bundled).
 */
import { readdirSync, readFileSync, statSync } from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { buildDir, ROOT } from "../support/appServer.ts";

function files(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const full = path.join(dir, name);
    return statSync(full).isDirectory() ? files(full) : [full];
  });
}

/** Every setting env.server.ts reads, by name. */
function settingNames(): string[] {
  const source = readFileSync(path.join(ROOT, "app/env.server.ts"), "utf8");
  return [...source.matchAll(/^\s{4}([A-Z][A-Z0-9_]+):/gm)].map((m) => m[1]);
}

describe("the client bundles", () => {
  const client = path.join(buildDir(), "client");
  const bundle = files(client)
    .filter((f) => /\.(js|css|html|json|map|txt|svg)$/.test(f))
    .map((f) => ({ file: path.relative(client, f), text: readFileSync(f, "utf8") }));

  it("were built and are what the browser loads", () => {
    expect(bundle.some((b) => b.file.startsWith("assets/") && b.file.endsWith(".js"))).toBe(true);
  });

  it("hold no secret value from the build's environment", () => {
    const secrets: [string, string | undefined][] = [
      ["SESSION_SECRET", process.env.SESSION_SECRET],
      ["GITHUB_CLIENT_SECRET", process.env.GITHUB_CLIENT_SECRET],
      ["DATABASE_URL", process.env.DATABASE_URL],
      ["the database password", process.env.DATABASE_URL ? decodeURIComponent(new URL(process.env.DATABASE_URL).password) : undefined],
    ];
    for (const [name, value] of secrets) {
      expect(value, `${name} is not set: run this through scripts/test, which sets it before building`).toBeTruthy();
      expect(value!.length).toBeGreaterThanOrEqual(16);
      for (const { file, text } of bundle) expect(text.includes(value!), `${name}'s value is in ${file}`).toBe(false);
    }
  });

  it("name none of the server's settings", () => {
    const names = settingNames();
    expect(names).toEqual(
      expect.arrayContaining(["DATABASE_URL", "SESSION_SECRET", "GITHUB_CLIENT_SECRET", "SMTP_URL", "DEV_MAILBOX_URL"]),
    );
    for (const name of names) for (const { file, text } of bundle) expect(text.includes(name), `${name} appears in ${file}`).toBe(false);
  });
});
