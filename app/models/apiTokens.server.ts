/**
 * Personal API tokens: a build or a script acts as the person who made the token, within the token's scope (`read`,
 * or `write` which includes read). The secret is shown once; only its SHA-256 is stored.
 */
import { createHash, randomBytes } from "node:crypto";
import { and, desc, eq, gt, isNull, lt, or, sql } from "drizzle-orm";
import type { Tx } from "../db/client.server.ts";
import { apiTokens, memberships, users, type ApiToken, type TokenScope, type User } from "../db/schema.ts";
import { recordActivity } from "./activity.server.ts";
import { DomainError } from "./errors.ts";

/** Every token starts with this, so secret scanners and people can tell a Skewsmith token on sight. */
export const TOKEN_PREFIX = "sks_";
/** A token: the prefix and 32 random bytes in base64url (43 characters). */
export const TOKEN_FORM = /^sks_[A-Za-z0-9_-]{43}$/;
/** Most live (not revoked, not expired) tokens one person may hold. */
export const TOKENS_PER_PERSON = 50;
/** How stale lastUsedAt may get before a use writes it again, in milliseconds: at most one write a minute per token. */
export const LAST_USED_RESOLUTION_MS = 60_000;

/** SHA-256 of a token, hex: the only form a token is kept in. */
export function hashToken(token: string): string {
  return createHash("sha256").update(token).digest("hex");
}

/** What a person sees of a token in a list (never the secret, never its hash). */
export type ApiTokenListItem = Pick<ApiToken, "id" | "name" | "scope" | "createdAt" | "lastUsedAt" | "expiresAt" | "revokedAt">;

const listColumns = {
  id: apiTokens.id,
  name: apiTokens.name,
  scope: apiTokens.scope,
  createdAt: apiTokens.createdAt,
  lastUsedAt: apiTokens.lastUsedAt,
  expiresAt: apiTokens.expiresAt,
  revokedAt: apiTokens.revokedAt,
};

/**
 * A line in the activity of every team the person belongs to: a token acts with their role in each of them, so each
 * team's members see that a new way in exists, or that one was closed (the secret is never in it).
 */
async function recordTokenActivity(tx: Tx, userId: string, action: "token.created" | "token.revoked", summary: string): Promise<void> {
  const teams = await tx.select({ teamId: memberships.teamId }).from(memberships).where(eq(memberships.userId, userId));
  for (const { teamId } of teams) await recordActivity(tx, { teamId, userId, action, summary });
}

/** Live: not revoked, and not past its expiry. */
const live = (now: Date) => and(isNull(apiTokens.revokedAt), or(isNull(apiTokens.expiresAt), gt(apiTokens.expiresAt, now)));

/**
 * Makes a token for `userId`. The name must be free among the person's live tokens (compared without case); a person
 * holds at most TOKENS_PER_PERSON live tokens. Returns the secret, which is never stored or shown again.
 */
export async function createApiToken(
  db: Tx,
  input: { userId: string; name: string; scope: TokenScope; expiresAt: Date | null },
): Promise<{ token: string; item: ApiTokenListItem }> {
  return db.transaction(async (tx) => {
    // One token change per person at a time, so two requests cannot both take the last free slot or the same name.
    await tx.execute(sql`select pg_advisory_xact_lock(hashtext('skewsmith.api_tokens'), hashtext(${input.userId}))`);
    const now = new Date();
    const held = await tx
      .select({ name: apiTokens.name })
      .from(apiTokens)
      .where(and(eq(apiTokens.userId, input.userId), live(now)));
    if (held.some((t) => t.name.toLowerCase() === input.name.toLowerCase()))
      throw new DomainError(`You already have a token called “${input.name}”. Choose another name, or revoke that one first.`, {
        field: "name",
        status: 409,
      });
    if (held.length >= TOKENS_PER_PERSON)
      throw new DomainError(`You hold ${held.length} live tokens, the most allowed. Revoke one you no longer use first.`, { status: 409 });
    const token = `${TOKEN_PREFIX}${randomBytes(32).toString("base64url")}`;
    const [item] = await tx
      .insert(apiTokens)
      .values({ userId: input.userId, name: input.name, scope: input.scope, tokenHash: hashToken(token), expiresAt: input.expiresAt })
      .returning(listColumns);
    const until = input.expiresAt ? `until ${input.expiresAt.toISOString().slice(0, 10)}` : "until revoked";
    await recordTokenActivity(tx, input.userId, "token.created", `made the API token “${input.name}” (${input.scope}, ${until})`);
    return { token, item };
  });
}

/** A person's tokens: live ones first (newest first), then revoked and expired ones. */
export async function listApiTokens(db: Tx, userId: string): Promise<ApiTokenListItem[]> {
  const now = new Date();
  return db
    .select(listColumns)
    .from(apiTokens)
    .where(eq(apiTokens.userId, userId))
    .orderBy(
      sql`case when ${apiTokens.revokedAt} is null and (${apiTokens.expiresAt} is null or ${apiTokens.expiresAt} > ${now}) then 0 else 1 end`,
      desc(apiTokens.createdAt),
      desc(apiTokens.id),
    );
}

/** One of the person's own tokens, or null (someone else's token is as good as none). */
export async function getApiToken(db: Tx, input: { userId: string; tokenId: string }): Promise<ApiTokenListItem | null> {
  const [token] = await db
    .select(listColumns)
    .from(apiTokens)
    .where(and(eq(apiTokens.id, input.tokenId), eq(apiTokens.userId, input.userId)));
  return token ?? null;
}

/** Revokes one of the person's own tokens; it stops working at once. Revoking twice is harmless (and recorded once). */
export async function revokeApiToken(db: Tx, input: { userId: string; tokenId: string }): Promise<ApiTokenListItem> {
  return db.transaction(async (tx) => {
    const mine = and(eq(apiTokens.id, input.tokenId), eq(apiTokens.userId, input.userId));
    const [before] = await tx.select(listColumns).from(apiTokens).where(mine).for("update");
    if (!before) throw new DomainError("You have no such token.", { status: 404 });
    if (before.revokedAt) return before;
    const [revoked] = await tx
      .update(apiTokens)
      .set({ revokedAt: sql`now()` })
      .where(mine)
      .returning(listColumns);
    await recordTokenActivity(tx, input.userId, "token.revoked", `revoked the API token “${revoked.name}” (${revoked.scope})`);
    return revoked;
  });
}

/** Why a presented token does not let anyone in. */
export type TokenRefusal = "unknown" | "revoked" | "expired";

/** The person and token behind a presented secret, or why it is refused. Looks the secret up by its hash only. */
export async function findApiToken(
  db: Tx,
  secret: string,
): Promise<{ ok: true; user: User; token: ApiToken } | { ok: false; reason: TokenRefusal; at?: Date }> {
  if (!TOKEN_FORM.test(secret)) return { ok: false, reason: "unknown" };
  const [row] = await db
    .select({ token: apiTokens, user: users })
    .from(apiTokens)
    .innerJoin(users, eq(users.id, apiTokens.userId))
    .where(eq(apiTokens.tokenHash, hashToken(secret)));
  if (!row) return { ok: false, reason: "unknown" };
  if (row.token.revokedAt) return { ok: false, reason: "revoked", at: row.token.revokedAt };
  if (row.token.expiresAt && row.token.expiresAt.getTime() <= Date.now()) return { ok: false, reason: "expired", at: row.token.expiresAt };
  return { ok: true, user: row.user, token: row.token };
}

/**
 * Records that a token was used, at most once per LAST_USED_RESOLUTION_MS: a build that calls the API a hundred times a
 * minute writes the row once. The condition is in the UPDATE itself, so parallel calls cannot write it twice either.
 */
export async function touchApiToken(db: Tx, token: Pick<ApiToken, "id" | "lastUsedAt">, now = new Date()): Promise<boolean> {
  if (token.lastUsedAt && now.getTime() - token.lastUsedAt.getTime() < LAST_USED_RESOLUTION_MS) return false;
  const cutoff = new Date(now.getTime() - LAST_USED_RESOLUTION_MS);
  const updated = await db
    .update(apiTokens)
    .set({ lastUsedAt: now })
    .where(and(eq(apiTokens.id, token.id), or(isNull(apiTokens.lastUsedAt), lt(apiTokens.lastUsedAt, cutoff))))
    .returning({ id: apiTokens.id });
  return updated.length > 0;
}
