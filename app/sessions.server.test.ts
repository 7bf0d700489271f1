import { eq } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { makeUser } from "../tests/factories.ts";
import { testDb } from "../tests/support/db.ts";
import { sessions } from "./db/schema.ts";
import { createDbSessionStorage, hashSessionId, verifiedId } from "./sessions.server.ts";

const db = testDb();
afterAll(() => db.$client.end());

const secrets = ["a-test-secret-that-is-long-enough-to-sign-cookies"];
const storage = createDbSessionStorage(db, { secrets, secure: false });

/** The name=value part of a Set-Cookie header, as a browser would send it back. */
const asCookie = (setCookie: string) => setCookie.split(";")[0];

/** The raw session id inside a signed cookie value (react-router signs as "<base64 JSON>.<signature>"). */
function idInCookie(setCookie: string): string {
  const value = decodeURIComponent(asCookie(setCookie).split("=").slice(1).join("="));
  const payload = value.slice(0, value.lastIndexOf("."));
  return JSON.parse(Buffer.from(payload, "base64").toString("utf8"));
}

async function signIn(userId: string) {
  const session = await storage.getSession();
  session.set("userId", userId);
  return storage.commitSession(session);
}

describe("database session storage", () => {
  it("sets an httpOnly, SameSite=Lax cookie on / that holds only a random id", async () => {
    const user = await makeUser(db);
    const setCookie = await signIn(user.id);
    expect(setCookie).toMatch(/^skewsmith_session=/);
    expect(setCookie).toMatch(/; HttpOnly/);
    expect(setCookie).toMatch(/; SameSite=Lax/);
    expect(setCookie).toMatch(/; Path=\//);
    expect(setCookie).not.toMatch(/; Secure/);
    const id = idInCookie(setCookie);
    expect(id).toMatch(/^[A-Za-z0-9_-]{43}$/); // 32 random bytes, base64url
    expect(setCookie).not.toContain(user.id);
  });

  it("keys the row by the id's SHA-256, never the id itself, and reads the user back", async () => {
    const user = await makeUser(db);
    const setCookie = await signIn(user.id);
    const id = idInCookie(setCookie);
    expect(await db.select().from(sessions).where(eq(sessions.idHash, id))).toEqual([]);
    const [row] = await db
      .select()
      .from(sessions)
      .where(eq(sessions.idHash, hashSessionId(id)));
    expect(row.userId).toBe(user.id);
    const session = await storage.getSession(asCookie(setCookie));
    expect(session.get("userId")).toBe(user.id);
  });

  it("ends the session on the server when it is destroyed: the old cookie then reads as signed out", async () => {
    const user = await makeUser(db);
    const setCookie = await signIn(user.id);
    const session = await storage.getSession(asCookie(setCookie));
    const cleared = await storage.destroySession(session);
    expect(cleared).toMatch(/Expires=Thu, 01 Jan 1970/);
    expect(
      await db
        .select()
        .from(sessions)
        .where(eq(sessions.idHash, hashSessionId(idInCookie(setCookie)))),
    ).toEqual([]);
    expect((await storage.getSession(asCookie(setCookie))).get("userId")).toBeUndefined();
  });

  it("ignores a cookie whose signature does not match, and an expired session", async () => {
    const user = await makeUser(db);
    const setCookie = await signIn(user.id);
    const other = createDbSessionStorage(db, { secrets: ["another-secret-of-enough-length-for-signing"], secure: false });
    expect((await other.getSession(asCookie(setCookie))).get("userId")).toBeUndefined();

    await db
      .update(sessions)
      .set({ expiresAt: new Date(Date.now() - 1000) })
      .where(eq(sessions.idHash, hashSessionId(idInCookie(setCookie))));
    expect((await storage.getSession(asCookie(setCookie))).get("userId")).toBeUndefined();
  });

  it("marks the cookie Secure, with the __Host- prefix, when asked (production)", async () => {
    const secure = createDbSessionStorage(db, { secrets, secure: true });
    const session = await secure.getSession();
    session.set("userId", (await makeUser(db)).id);
    const setCookie = await secure.commitSession(session);
    expect(setCookie).toMatch(/^__Host-skewsmith=/);
    expect(setCookie).toMatch(/; Secure/);
  });
});

describe("reading the person behind a cookie (readUser)", () => {
  it("agrees with the framework's signed cookie: the right person for a good cookie, nobody for a forged or old one", async () => {
    const user = await makeUser(db);
    const setCookie = await signIn(user.id);
    const id = idInCookie(setCookie);
    expect(verifiedId(asCookie(setCookie), "skewsmith_session", [Buffer.from(secrets[0])])).toBe(id);
    expect((await storage.readUser(`other=1; ${asCookie(setCookie)}`))?.id).toBe(user.id);
    // A signature by another secret, a flipped character, a cookie of another name: nobody.
    const other = createDbSessionStorage(db, { secrets: ["another-secret-of-enough-length-for-signing"], secure: false });
    expect(await other.readUser(asCookie(setCookie))).toBeNull();
    const value = asCookie(setCookie);
    // The flip is made in the decoded signature and encoded again: flipping the raw text could hit a %-escape ("+" and
    // "/" of the signature are sent as %2B and %2F), which is malformed rather than forged.
    const [name, raw] = [value.slice(0, value.indexOf("=")), decodeURIComponent(value.slice(value.indexOf("=") + 1))];
    const at = raw.lastIndexOf(".") + 1;
    const flipped = `${name}=${encodeURIComponent(raw.slice(0, at) + (raw[at] === "A" ? "B" : "A") + raw.slice(at + 1))}`;
    expect(await storage.readUser(flipped)).toBeNull();
    expect(verifiedId(flipped, "skewsmith_session", [Buffer.from(secrets[0])])).toBeNull();
    expect(await storage.readUser(value.replace("skewsmith_session", "skewsmith_sessionx"))).toBeNull();
    expect(await storage.readUser("skewsmith_session=garbage%ZZ")).toBeNull();
    // An expired or ended session opens nothing, even with its valid signature (and its cookie checked, and
    // remembered as checked, by the reads above).
    await db
      .update(sessions)
      .set({ expiresAt: new Date(Date.now() - 1000) })
      .where(eq(sessions.idHash, hashSessionId(id)));
    expect(await storage.readUser(value)).toBeNull();
  });

  it("still accepts cookies signed with an older secret listed after the current one", async () => {
    const user = await makeUser(db);
    const old = createDbSessionStorage(db, { secrets: ["the-old-secret-that-is-long-enough-to-sign"], secure: false });
    const session = await old.getSession();
    session.set("userId", user.id);
    const cookie = asCookie(await old.commitSession(session));
    const rotated = createDbSessionStorage(db, {
      secrets: ["the-new-secret-that-is-long-enough-to-sign", "the-old-secret-that-is-long-enough-to-sign"],
      secure: false,
    });
    expect((await rotated.readUser(cookie))?.id).toBe(user.id);
  });
});
