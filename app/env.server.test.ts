import { describe, expect, it } from "vitest";
import { readEnv } from "./env.server.ts";

const complete = {
  NODE_ENV: "production",
  DATABASE_URL: "postgres://u:p@127.0.0.1:5432/db",
  APP_URL: "https://skewsmith.example/",
  SESSION_SECRET: "x".repeat(64),
  GITHUB_CLIENT_ID: "id",
  GITHUB_CLIENT_SECRET: "secret",
};

describe("readEnv", () => {
  it("names every missing variable in one message", () => {
    expect(() => readEnv({})).toThrow(/DATABASE_URL[\s\S]*APP_URL[\s\S]*SESSION_SECRET[\s\S]*GITHUB_CLIENT_ID[\s\S]*GITHUB_CLIENT_SECRET/);
  });

  it("explains what a short session secret needs", () => {
    expect(() => readEnv({ ...complete, SESSION_SECRET: "short" })).toThrow(/SESSION_SECRET: must be at least 32 characters/);
  });

  it("uses github.com and Secure cookies in production over https", () => {
    const env = readEnv(complete);
    expect(env.usesFakeGitHub).toBe(false);
    expect(env.secureCookies).toBe(true);
    expect(env.APP_URL).toBe("https://skewsmith.example");
  });

  it("refuses plain http in production except on loopback, where cookies cannot be Secure", () => {
    expect(() => readEnv({ ...complete, APP_URL: "http://skewsmith.example" })).toThrow(/APP_URL must use https in production/);
    expect(readEnv({ ...complete, APP_URL: "http://127.0.0.1:3000" }).secureCookies).toBe(false);
  });

  it("takes the local stand-ins only together and only on loopback", () => {
    const fake = { GITHUB_OAUTH_URL: "http://127.0.0.1:54330", GITHUB_API_URL: "http://127.0.0.1:54330/api" };
    expect(readEnv({ ...complete, ...fake }).usesFakeGitHub).toBe(true);
    expect(() => readEnv({ ...complete, GITHUB_OAUTH_URL: fake.GITHUB_OAUTH_URL })).toThrow(
      /set GITHUB_OAUTH_URL and GITHUB_API_URL together/,
    );
    expect(() => readEnv({ ...complete, GITHUB_OAUTH_URL: "http://github.example", GITHUB_API_URL: "http://github.example/api" })).toThrow(
      /GITHUB_OAUTH_URL is for local stand-ins only/,
    );
  });

  it("never sets Secure outside production", () => {
    expect(readEnv({ ...complete, NODE_ENV: "development", APP_URL: "http://dev.example:3000" }).secureCookies).toBe(false);
  });

  it("serves the development mailbox only beside the local mail catcher, never where real mail is sent", () => {
    const local = { SMTP_URL: "smtp://127.0.0.1:54325", DEV_MAILBOX_URL: "http://127.0.0.1:54326" };
    expect(readEnv({ ...complete, ...local }).mailboxEnabled).toBe(true);
    expect(readEnv({ ...complete, SMTP_URL: "smtps://mail.example:465" }).mailboxEnabled).toBe(false);
    expect(() => readEnv({ ...complete, ...local, SMTP_URL: "smtps://mail.example:465" })).toThrow(
      /DEV_MAILBOX_URL \(the development mailbox\) needs SMTP_URL to be the local mail catcher on 127.0.0.1 \(got smtps:\/\/mail.example:465\)/,
    );
    expect(() => readEnv({ ...complete, DEV_MAILBOX_URL: local.DEV_MAILBOX_URL })).toThrow(/got no SMTP_URL/);
  });

  it("reads rate limits and the number of trusted proxies, with defaults, and names a bad one", () => {
    const env = readEnv(complete);
    expect(env.rateLimits).toEqual({
      signIn: { limit: 20, windowSeconds: 300 },
      invitations: { limit: 10, windowSeconds: 300 },
      api: { limit: 600, windowSeconds: 60 },
    });
    expect(env.TRUST_PROXY).toBe(0);
    expect(readEnv({ ...complete, RATE_LIMIT_API: "10/1", TRUST_PROXY: "1" })).toMatchObject({
      rateLimits: { api: { limit: 10, windowSeconds: 1 } },
      TRUST_PROXY: 1,
    });
    expect(() => readEnv({ ...complete, RATE_LIMIT_SIGN_IN: "lots" })).toThrow(/RATE_LIMIT_SIGN_IN: must be "count\/seconds"/);
  });

  it("knows the app's origin and the sign-in provider's", () => {
    expect(readEnv(complete)).toMatchObject({ appOrigin: "https://skewsmith.example", oauthOrigin: "https://github.com" });
    const fake = { GITHUB_OAUTH_URL: "http://127.0.0.1:54330", GITHUB_API_URL: "http://127.0.0.1:54330/api" };
    expect(readEnv({ ...complete, ...fake }).oauthOrigin).toBe("http://127.0.0.1:54330");
  });
});
