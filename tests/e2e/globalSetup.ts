/**
 * Starts what the browser tests need on 127.0.0.1, each on a port the operating system picks: the local GitHub
 * stand-in, the mail catcher and the production server (server.js over this run's build, as the start command
 * serves it). The server reports the port it bound, so nothing is picked here and bound later by someone else.
 * scripts/test has already created, migrated and seeded this run's database and built the app.
 */
import { randomBytes } from "node:crypto";
import type { TestProject } from "vitest/node";
import { startFakeMail } from "../../scripts/fakes/mail.ts";
import { startFakeGitHub } from "../../scripts/fakes/oauth.ts";
import { startApp } from "../support/appServer.ts";

declare module "vitest" {
  export interface ProvidedContext {
    appUrl: string;
    mailboxUrl: string;
    githubUrl: string;
    smtpUrl: string;
  }
}

export default async function setup(project: TestProject) {
  const databaseUrl = process.env.DATABASE_URL;
  if (!databaseUrl) throw new Error("DATABASE_URL is not set: run the browser tests through scripts/test.");
  const clientId = "skewsmith-e2e";
  const clientSecret = randomBytes(16).toString("hex");
  const github = await startFakeGitHub({ clientId, clientSecret });
  const mail = await startFakeMail();
  let app;
  try {
    app = await startApp({
      databaseUrl,
      env: {
        GITHUB_CLIENT_ID: clientId,
        GITHUB_CLIENT_SECRET: clientSecret,
        GITHUB_OAUTH_URL: github.url,
        GITHUB_API_URL: github.apiUrl,
        SMTP_URL: mail.smtpUrl,
        DEV_MAILBOX_URL: mail.mailboxUrl,
        // Every test signs in through the stand-in, several at once: far more often than a person would.
        RATE_LIMIT_SIGN_IN: "10000/60",
        RATE_LIMIT_INVITATIONS: "10000/60",
      },
    });
  } catch (error) {
    await github.close();
    await mail.close();
    throw error;
  }
  project.provide("appUrl", app.url);
  project.provide("mailboxUrl", mail.mailboxUrl);
  project.provide("githubUrl", github.url);
  project.provide("smtpUrl", mail.smtpUrl);

  return async () => {
    await app.stop();
    await github.close();
    await mail.close();
    if (process.env.SKEWSMITH_E2E_SERVER_LOG) console.log([...app.other, ...app.lines.map((l) => JSON.stringify(l))].join("\n"));
  };
}
