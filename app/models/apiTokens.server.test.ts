import { createHash } from "node:crypto";
import { and, asc, eq, like } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { makeTeam, makeUser } from "../../tests/factories.ts";
import { testDb } from "../../tests/support/db.ts";
import { activity, apiTokens } from "../db/schema.ts";
import {
  createApiToken,
  findApiToken,
  hashToken,
  LAST_USED_RESOLUTION_MS,
  listApiTokens,
  revokeApiToken,
  TOKEN_FORM,
  TOKENS_PER_PERSON,
  touchApiToken,
} from "./apiTokens.server.ts";
import { DomainError } from "./errors.ts";

const db = testDb();
afterAll(() => db.$client.end());

const make = (userId: string, name: string, scope: "read" | "write" = "read", expiresAt: Date | null = null) =>
  createApiToken(db, { userId, name, scope, expiresAt });

async function refusal(work: Promise<unknown>): Promise<DomainError> {
  try {
    await work;
  } catch (error) {
    if (error instanceof DomainError) return error;
    throw error;
  }
  throw new Error("expected a DomainError");
}

describe("API tokens", () => {
  it("are sks_ and 32 random bytes, kept only as their SHA-256", async () => {
    const user = await makeUser(db);
    const { token, item } = await make(user.id, "build");
    expect(token).toMatch(TOKEN_FORM);
    expect(Buffer.from(token.slice(4), "base64url")).toHaveLength(32);
    const [row] = await db.select().from(apiTokens).where(eq(apiTokens.id, item.id));
    // SHA-256 as computed by node:crypto, which wraps OpenSSL (a reference implementation outside the project).
    expect(row.tokenHash).toBe(createHash("sha256").update(token).digest("hex"));
    expect(hashToken(token)).toBe(row.tokenHash);
    expect(JSON.stringify(row)).not.toContain(token.slice(4));
    expect(Object.keys(item)).not.toContain("tokenHash");
  });

  it("find their person, and say why a revoked, expired or unknown one is refused", async () => {
    const user = await makeUser(db);
    const live = await make(user.id, "live", "write");
    const found = await findApiToken(db, live.token);
    expect(found.ok && found.user.id).toBe(user.id);
    expect(found.ok && found.token.scope).toBe("write");

    const old = await make(user.id, "old", "read", new Date(Date.now() - 1));
    expect(await findApiToken(db, old.token)).toMatchObject({ ok: false, reason: "expired" });
    await revokeApiToken(db, { userId: user.id, tokenId: live.item.id });
    expect(await findApiToken(db, live.token)).toMatchObject({ ok: false, reason: "revoked" });
    expect(await findApiToken(db, `sks_${"A".repeat(43)}`)).toEqual({ ok: false, reason: "unknown" });
    expect(await findApiToken(db, "ghp_notours")).toEqual({ ok: false, reason: "unknown" });
    expect(await findApiToken(db, `${live.token}x`)).toEqual({ ok: false, reason: "unknown" });
  });

  it("keep names unique among a person's live tokens (without case), even when made at once; a revoked one frees its name", async () => {
    const user = await makeUser(db);
    const other = await makeUser(db);
    const results = await Promise.allSettled(Array.from({ length: 6 }, () => make(user.id, "Deploy")));
    expect(results.filter((r) => r.status === "fulfilled")).toHaveLength(1);
    for (const r of results.filter((r) => r.status === "rejected"))
      expect((r as PromiseRejectedResult).reason).toMatchObject({ field: "name", status: 409 });
    const clash = await refusal(make(user.id, "deploy"));
    expect(clash.message).toContain("You already have a token called “deploy”");
    // Someone else may use the same name.
    await make(other.id, "deploy");
    const [first] = await listApiTokens(db, user.id);
    await revokeApiToken(db, { userId: user.id, tokenId: first.id });
    await make(user.id, "deploy");
    expect((await listApiTokens(db, user.id)).map((t) => [t.name, t.revokedAt === null])).toEqual([
      ["deploy", true],
      ["Deploy", false],
    ]);
  });

  it("are at most TOKENS_PER_PERSON live ones a person", async () => {
    const user = await makeUser(db);
    for (let i = 0; i < TOKENS_PER_PERSON; i++) await make(user.id, `t${i}`);
    const full = await refusal(make(user.id, "one more"));
    expect(full.status).toBe(409);
    expect(full.message).toContain(`You hold ${TOKENS_PER_PERSON} live tokens`);
  });

  it("can be revoked only by their own person; revoking twice keeps the first time", async () => {
    const user = await makeUser(db);
    const stranger = await makeUser(db);
    const { item } = await make(user.id, "mine");
    expect((await refusal(revokeApiToken(db, { userId: stranger.id, tokenId: item.id }))).status).toBe(404);
    const first = await revokeApiToken(db, { userId: user.id, tokenId: item.id });
    const second = await revokeApiToken(db, { userId: user.id, tokenId: item.id });
    expect(second.revokedAt).toEqual(first.revokedAt);
  });

  it("record their last use at most once per resolution, even from parallel calls", async () => {
    const user = await makeUser(db);
    const { token, item } = await make(user.id, "touchy");
    const row = async () => (await db.select().from(apiTokens).where(eq(apiTokens.id, item.id)))[0];
    const t0 = new Date("2031-01-01T00:00:00Z");
    const writes = await Promise.all(Array.from({ length: 5 }, () => touchApiToken(db, { id: item.id, lastUsedAt: null }, t0)));
    expect(writes.filter(Boolean)).toHaveLength(1);
    expect((await row()).lastUsedAt).toEqual(t0);
    const soon = new Date(t0.getTime() + LAST_USED_RESOLUTION_MS - 1);
    expect(await touchApiToken(db, await row(), soon)).toBe(false);
    const later = new Date(t0.getTime() + LAST_USED_RESOLUTION_MS + 1);
    expect(await touchApiToken(db, await row(), later)).toBe(true);
    expect((await row()).lastUsedAt).toEqual(later);
    expect(token).toMatch(TOKEN_FORM);
  });

  it("leave a line in the activity of every team of their person when made and when revoked (once), never the secret", async () => {
    const [owner, member, loner] = [await makeUser(db), await makeUser(db), await makeUser(db)];
    const mine = await makeTeam(db, { owner });
    const theirs = await makeTeam(db, { owner: member, members: [{ user: owner, role: "editor" }] });
    const lines = async (teamId: string) =>
      await db
        .select({ action: activity.action, summary: activity.summary, userId: activity.userId })
        .from(activity)
        .where(and(eq(activity.teamId, teamId), like(activity.action, "token.%")))
        .orderBy(asc(activity.id));
    const expiresAt = new Date("2031-05-06T12:00:00Z");
    const { token, item } = await make(owner.id, "nightly build", "write", expiresAt);
    for (const teamId of [mine.id, theirs.id])
      expect(await lines(teamId)).toEqual([
        { action: "token.created", summary: "made the API token “nightly build” (write, until 2031-05-06)", userId: owner.id },
      ]);
    expect(JSON.stringify(await lines(mine.id))).not.toContain(token);

    await revokeApiToken(db, { userId: owner.id, tokenId: item.id });
    await revokeApiToken(db, { userId: owner.id, tokenId: item.id });
    for (const teamId of [mine.id, theirs.id])
      expect((await lines(teamId)).map((l) => [l.action, l.summary])).toEqual([
        ["token.created", "made the API token “nightly build” (write, until 2031-05-06)"],
        ["token.revoked", "revoked the API token “nightly build” (write)"],
      ]);

    // Someone in no team makes and revokes a token without a line anywhere (and without an error).
    const lonely = await make(loner.id, "scratch");
    await revokeApiToken(db, { userId: loner.id, tokenId: lonely.item.id });
    expect(await db.select().from(activity).where(eq(activity.userId, loner.id))).toEqual([]);
  });
});
