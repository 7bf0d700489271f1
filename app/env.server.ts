import { z } from "zod";

const LOOPBACK = new Set(["127.0.0.1", "localhost", "[::1]"]);

const optionalUrl = z
  .string()
  .url()
  .optional()
  .transform((v) => (v ? v.replace(/\/+$/, "") : undefined));

const schema = z
  .object({
    NODE_ENV: z.enum(["development", "production", "test"]).default("development"),
    DATABASE_URL: z.string().regex(/^postgres(ql)?:\/\//, "must be a postgres:// connection URL"),
    /** Where people reach the app; the OAuth callback is built from it. */
    APP_URL: z
      .string()
      .url()
      .transform((v) => v.replace(/\/+$/, "")),
    SESSION_SECRET: z.string().min(32, "must be at least 32 characters (say, 64 random hex digits)"),
    GITHUB_CLIENT_ID: z.string().min(1),
    GITHUB_CLIENT_SECRET: z.string().min(1),
    /** Development and tests only: base URL of a stand-in for github.com (the local fake provider). */
    GITHUB_OAUTH_URL: optionalUrl,
    /** Development and tests only: base URL of a stand-in for api.github.com. */
    GITHUB_API_URL: optionalUrl,
    /** Outgoing mail server, say smtp://127.0.0.1:54325 for the local fake. */
    SMTP_URL: z
      .string()
      .regex(/^smtps?:\/\//, "must be an smtp:// or smtps:// URL")
      .optional(),
    MAIL_FROM: z.string().default("Skewsmith <no-reply@skewsmith.invalid>"),
    /** Development and tests only: the local mail catcher's HTTP address, which turns on the mailbox page. */
    DEV_MAILBOX_URL: optionalUrl,
  })
  .superRefine((env, ctx) => {
    if ((env.GITHUB_OAUTH_URL === undefined) !== (env.GITHUB_API_URL === undefined))
      ctx.addIssue({
        code: "custom",
        path: ["GITHUB_API_URL"],
        message: "set GITHUB_OAUTH_URL and GITHUB_API_URL together (both point at the local fake provider) or neither",
      });
  });

export type Env = z.output<typeof schema> & {
  /** True when the app talks to a local stand-in for GitHub rather than github.com. */
  readonly usesFakeGitHub: boolean;
  /** True when cookies must carry the Secure flag: production, except plain http on loopback. */
  readonly secureCookies: boolean;
};

/** Reads and validates the environment; throws one message that names every missing or bad variable. */
export function readEnv(source: Record<string, string | undefined> = process.env): Env {
  const result = schema.safeParse(source);
  if (!result.success) {
    const lines = result.error.issues.map((i) => `  ${i.path.join(".") || "(environment)"}: ${i.message}`);
    throw new Error(
      `Skewsmith cannot start: the environment is incomplete.\n${lines.join("\n")}\nSee README (scripts/start sets all of these).`,
    );
  }
  const env = result.data;
  const app = new URL(env.APP_URL);
  const plainLoopback = app.protocol === "http:" && LOOPBACK.has(app.hostname);
  if (env.NODE_ENV === "production" && app.protocol !== "https:" && !plainLoopback)
    throw new Error(`Skewsmith cannot start: APP_URL must use https in production (got ${env.APP_URL}).`);
  for (const key of ["GITHUB_OAUTH_URL", "GITHUB_API_URL", "DEV_MAILBOX_URL"] as const) {
    const value = env[key];
    if (value !== undefined && !LOOPBACK.has(new URL(value).hostname))
      throw new Error(`Skewsmith cannot start: ${key} is for local stand-ins only and must point at 127.0.0.1 (got ${value}).`);
  }
  return {
    ...env,
    usesFakeGitHub: env.GITHUB_OAUTH_URL !== undefined,
    secureCookies: env.NODE_ENV === "production" && !plainLoopback,
  };
}

let cached: Env | undefined;

/** The validated environment, read once. */
export function env(): Env {
  cached ??= readEnv();
  return cached;
}
