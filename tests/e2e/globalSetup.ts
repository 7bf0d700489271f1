/**
 * Starts what the browser tests need, on free ports on 127.0.0.1: the local GitHub stand-in, the mail
 * catcher and the production build of the app (served by react-router-serve, as the start command does).
 * scripts/test has already created, migrated and seeded this run's database and built the app.
 */
import { spawn, type ChildProcess } from "node:child_process";
import { randomBytes } from "node:crypto";
import { existsSync } from "node:fs";
import { createServer } from "node:net";
import path from "node:path";
import { fileURLToPath } from "node:url";
import type { TestProject } from "vitest/node";
import { startFakeMail } from "../../scripts/fakes/mail.ts";
import { startFakeGitHub } from "../../scripts/fakes/oauth.ts";

declare module "vitest" {
  export interface ProvidedContext {
    appUrl: string;
    mailboxUrl: string;
    githubUrl: string;
    smtpUrl: string;
  }
}

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../..");

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = createServer();
    server.once("error", reject);
    server.listen(0, "127.0.0.1", () => {
      const { port } = server.address() as { port: number };
      server.close(() => resolve(port));
    });
  });
}

async function waitFor(url: string, child: ChildProcess, log: () => string): Promise<void> {
  const deadline = Date.now() + 30_000;
  while (Date.now() < deadline) {
    if (child.exitCode !== null) throw new Error(`the app exited (${child.exitCode}) before answering:\n${log()}`);
    const ok = await fetch(url).then(
      (r) => r.ok,
      () => false,
    );
    if (ok) return;
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error(`the app did not answer ${url} within 30 s:\n${log()}`);
}

export default async function setup(project: TestProject) {
  const databaseUrl = process.env.DATABASE_URL;
  if (!databaseUrl) throw new Error("DATABASE_URL is not set: run the browser tests through scripts/test.");
  const server = path.join(ROOT, "build/server/index.js");
  if (!existsSync(server)) throw new Error("build/server/index.js is missing: scripts/test builds the app first (react-router build).");

  const clientId = "skewsmith-e2e";
  const clientSecret = randomBytes(16).toString("hex");
  const github = await startFakeGitHub({ clientId, clientSecret });
  const mail = await startFakeMail();
  const port = await freePort();
  const appUrl = `http://127.0.0.1:${port}`;

  let output = "";
  const app = spawn(process.execPath, [path.join(ROOT, "node_modules/@react-router/serve/bin.js"), server], {
    cwd: ROOT,
    env: {
      ...process.env,
      NODE_ENV: "production",
      HOST: "127.0.0.1",
      PORT: String(port),
      DATABASE_URL: databaseUrl,
      APP_URL: appUrl,
      SESSION_SECRET: randomBytes(32).toString("hex"),
      GITHUB_CLIENT_ID: clientId,
      GITHUB_CLIENT_SECRET: clientSecret,
      GITHUB_OAUTH_URL: github.url,
      GITHUB_API_URL: github.apiUrl,
      SMTP_URL: mail.smtpUrl,
      DEV_MAILBOX_URL: mail.mailboxUrl,
    },
    stdio: ["ignore", "pipe", "pipe"],
  });
  const keep = (chunk: Buffer) => {
    output = (output + chunk.toString()).slice(-20_000);
  };
  app.stdout!.on("data", keep);
  app.stderr!.on("data", keep);

  try {
    await waitFor(`${appUrl}/healthz`, app, () => output);
  } catch (error) {
    app.kill("SIGKILL");
    await github.close();
    await mail.close();
    throw error;
  }
  project.provide("appUrl", appUrl);
  project.provide("mailboxUrl", mail.mailboxUrl);
  project.provide("githubUrl", github.url);
  project.provide("smtpUrl", mail.smtpUrl);

  return async () => {
    const exited = new Promise((resolve) => app.once("exit", resolve));
    app.kill("SIGTERM");
    const timer = setTimeout(() => app.kill("SIGKILL"), 5_000);
    await exited;
    clearTimeout(timer);
    await github.close();
    await mail.close();
    if (process.env.SKEWSMITH_E2E_SERVER_LOG) console.log(output);
  };
}
