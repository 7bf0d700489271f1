import { z } from "zod";
import { parseRateLimit, type RateLimit } from "./rateLimit.server.ts";

const LOOPBACK = new Set(["127.0.0.1", "localhost", "[::1]"]);

const optionalUrl = z
  .string()
  .url()
  .optional()
  .transform((v) => (v ? v.replace(/\/+$/, "") : undefined));

const rateLimit = (fallback: string) =>
  z
    .string()
    .default(fallback)
    .transform((v, ctx) => {
      const parsed = parseRateLimit(v);
      if (!parsed) {
        ctx.addIssue({ code: "custom", message: `must be "count/seconds" such as ${fallback} (got ${v})` });
        return z.NEVER;
      }
      return parsed;
    });

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
    /**
     * Development and tests only: the local mail catcher's HTTP address, which turns on the mailbox page. Refused
     * unless SMTP_URL is the local catcher too: a deployment with real mail never shows a mailbox.
     */
    DEV_MAILBOX_URL: optionalUrl,
    /** Rate limits as "count/seconds" (a burst of `count`, refilled over `seconds`), per client address or token. */
    RATE_LIMIT_SIGN_IN: rateLimit("20/300"),
    RATE_LIMIT_INVITATIONS: rateLimit("10/300"),
    RATE_LIMIT_API: rateLimit("600/60"),
    /**
     * How many proxies in front of the app to believe about the client's address (X-Forwarded-For), for rate
     * limits and logs. 0 (the default) trusts none: the address is the socket's.
     */
    TRUST_PROXY: z.coerce.number().int().min(0).max(10).default(0),
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
  /** The origin people reach the app at (scheme, host, port), what every state-changing request must come from. */
  readonly appOrigin: string;
  /** The origin of the sign-in provider's authorize page (github.com or the stand-in): the sign-in form leads there. */
  readonly oauthOrigin: string;
  /** True when the mailbox page is served: only with the local mail catcher configured. */
  readonly mailboxEnabled: boolean;
  readonly rateLimits: { signIn: RateLimit; invitations: RateLimit; api: RateLimit };
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
  if (env.DEV_MAILBOX_URL !== undefined) {
    // The mailbox shows every message the app sent: only ever the local catcher's, never a real mail server's.
    const smtp = env.SMTP_URL ? new URL(env.SMTP_URL.replace(/^smtps?:/, "http:")) : null;
    if (!smtp || !LOOPBACK.has(smtp.hostname))
      throw new Error(
        `Skewsmith cannot start: DEV_MAILBOX_URL (the development mailbox) needs SMTP_URL to be the local mail catcher on 127.0.0.1 (got ${env.SMTP_URL ?? "no SMTP_URL"}); unset DEV_MAILBOX_URL where real mail is sent.`,
      );
  }
  return {
    ...env,
    usesFakeGitHub: env.GITHUB_OAUTH_URL !== undefined,
    secureCookies: env.NODE_ENV === "production" && !plainLoopback,
    appOrigin: app.origin,
    oauthOrigin: new URL(env.GITHUB_OAUTH_URL ?? "https://github.com").origin,
    mailboxEnabled: env.DEV_MAILBOX_URL !== undefined,
    rateLimits: { signIn: env.RATE_LIMIT_SIGN_IN, invitations: env.RATE_LIMIT_INVITATIONS, api: env.RATE_LIMIT_API },
  };
}

let cached: Env | undefined;

/** The validated environment, read once. */
export function env(): Env {
  cached ??= readEnv();
  return cached;
}
