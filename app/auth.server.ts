import { OAuth2Client, type GitHub } from "arctic";
import { Authenticator } from "remix-auth";
import { GitHubStrategy } from "remix-auth-github";
import type { Strategy } from "remix-auth/strategy";
import { z } from "zod";
import type { Db } from "./db/client.server.ts";
import type { User } from "./db/schema.ts";
import { db } from "./db.server.ts";
import { env, type Env } from "./env.server.ts";
import { upsertGitHubUser, type GitHubProfile } from "./models/users.server.ts";

/** github.com's endpoints, used when no stand-in is configured. */
export const GITHUB_API_URL = "https://api.github.com";

/** Name of the short-lived cookie that carries the OAuth state between the two legs of sign-in. */
export const OAUTH_STATE_COOKIE = "skewsmith_oauth";

/**
 * The stock GitHub strategy with its client swapped for arctic's generic OAuth2Client, pointed at
 * configurable authorize and token URLs (the local fake provider in development and tests).
 * Everything else, the state cookie and its check included, is the stock strategy's.
 */
export class ConfigurableGitHubStrategy<U> extends GitHubStrategy<U> {
  constructor(
    options: GitHubStrategy.ConstructorOptions,
    endpoints: { authorizationURL: string; tokenURL: string },
    verify: Strategy.VerifyFunction<U, GitHubStrategy.VerifyOptions>,
  ) {
    super(options, verify);
    const client = new OAuth2Client(options.clientId, options.clientSecret, options.redirectURI.toString());
    const adapter: Pick<GitHub, "createAuthorizationURL" | "validateAuthorizationCode" | "refreshAccessToken"> = {
      createAuthorizationURL: (state, scopes) => client.createAuthorizationURL(endpoints.authorizationURL, state, scopes),
      validateAuthorizationCode: (code) => client.validateAuthorizationCode(endpoints.tokenURL, code, null),
      refreshAccessToken: (refreshToken) => client.refreshAccessToken(endpoints.tokenURL, refreshToken, []),
    };
    this.client = adapter as GitHub;
  }
}

const gitHubUser = z.object({
  id: z.number().int().positive(),
  login: z.string().min(1),
  name: z.string().nullable().optional(),
  email: z.string().nullable().optional(),
  avatar_url: z.string().nullable().optional(),
});

/** Reads the signed-in person's profile from the GitHub API (or its stand-in) with an access token. */
export async function fetchGitHubProfile(apiURL: string, accessToken: string): Promise<GitHubProfile> {
  const headers = {
    Accept: "application/vnd.github+json",
    Authorization: `Bearer ${accessToken}`,
    "User-Agent": "Skewsmith",
    "X-GitHub-Api-Version": "2022-11-28",
  };
  const response = await fetch(`${apiURL}/user`, { headers });
  if (!response.ok) throw new Error(`GitHub answered ${response.status} to GET /user`);
  const user = gitHubUser.parse(await response.json());
  let email = user.email ?? null;
  if (!email) {
    // A private e-mail address is only listed by /user/emails (needs the user:email scope).
    const emails = await fetch(`${apiURL}/user/emails`, { headers }).catch(() => null);
    if (emails?.ok) {
      const list = z.array(z.object({ email: z.string(), primary: z.boolean(), verified: z.boolean() })).safeParse(await emails.json());
      if (list.success) email = list.data.find((e) => e.primary && e.verified)?.email ?? null;
    }
  }
  return { githubId: user.id, login: user.login, name: user.name ?? null, email, avatarUrl: user.avatar_url ?? null };
}

/** The sign-in machinery: remix-auth with the GitHub strategy, stock against github.com unless stand-in URLs are set. */
export function createAuthenticator(database: Db, config: Env): Authenticator<User> {
  const options: GitHubStrategy.ConstructorOptions = {
    clientId: config.GITHUB_CLIENT_ID,
    clientSecret: config.GITHUB_CLIENT_SECRET,
    redirectURI: `${config.APP_URL}/auth/github/callback`,
    scopes: ["read:user", "user:email"],
    cookie: {
      name: OAUTH_STATE_COOKIE,
      httpOnly: true,
      sameSite: "Lax",
      path: "/",
      ...(config.secureCookies ? { secure: true as const } : {}),
    },
  };
  const apiURL = config.GITHUB_API_URL ?? GITHUB_API_URL;
  const verify = async ({ tokens }: GitHubStrategy.VerifyOptions) =>
    upsertGitHubUser(database, await fetchGitHubProfile(apiURL, tokens.accessToken()));
  const strategy = config.GITHUB_OAUTH_URL
    ? new ConfigurableGitHubStrategy<User>(
        options,
        {
          authorizationURL: `${config.GITHUB_OAUTH_URL}/login/oauth/authorize`,
          tokenURL: `${config.GITHUB_OAUTH_URL}/login/oauth/access_token`,
        },
        verify,
      )
    : new GitHubStrategy<User>(options, verify);
  return new Authenticator<User>().use(strategy, "github");
}

let authenticator: Authenticator<User> | undefined;

/** The app's authenticator, created on first use. */
export function auth(): Authenticator<User> {
  authenticator ??= createAuthenticator(db(), env());
  return authenticator;
}
