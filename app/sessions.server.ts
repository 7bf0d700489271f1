import { createHash, createHmac, randomBytes, timingSafeEqual } from "node:crypto";
import { and, eq, gt, lt, sql } from "drizzle-orm";
import { createCookie, createSessionStorage, type SessionStorage } from "react-router";
import type { Db } from "./db/client.server.ts";
import { sessions, users, type User } from "./db/schema.ts";
import { db } from "./db.server.ts";
import { env } from "./env.server.ts";

export interface SessionData {
  userId: string;
}

/** How long a session lasts without signing in again, in seconds (30 days). */
export const SESSION_MAX_AGE = 60 * 60 * 24 * 30;

/** The table keys sessions by the SHA-256 of the id, so a copy of the table cannot be replayed as cookies. */
export function hashSessionId(id: string): string {
  return createHash("sha256").update(id).digest("hex");
}

/**
 * Session storage in the `sessions` table. The cookie holds only a random, signed session id; it is
 * httpOnly and SameSite=Lax, and Secure (with the __Host- prefix) when `secure` is set.
 */
/**
 * The session id in a Cookie header, checked with Node's HMAC: the framework's signed-cookie format (the value is
 * base64 of the JSON id, then ".", then the unpadded base64 HMAC-SHA256 of that value under a secret), read without
 * the Web Crypto round trips the framework's own check makes on every request. Undefined when the cookie is absent
 * or not of that simple form (the caller then asks the framework); null when its signature is wrong.
 */
export function verifiedId(cookieHeader: string, name: string, keys: Buffer[]): string | null | undefined {
  const raw = cookieValue(cookieHeader, name);
  return raw === undefined ? undefined : verifiedValue(raw, keys);
}

/** The raw value of cookie `name` in a Cookie header (the first one of that name), or undefined. */
function cookieValue(cookieHeader: string, name: string): string | undefined {
  for (const part of cookieHeader.split(";")) {
    const at = part.indexOf("=");
    if (at > 0 && part.slice(0, at).trim() === name) return part.slice(at + 1).trim();
  }
  return undefined;
}

/** verifiedId for a cookie's raw value. */
function verifiedValue(raw: string, keys: Buffer[]): string | null | undefined {
  let value: string;
  try {
    value = decodeURIComponent(raw);
  } catch {
    return undefined;
  }
  const dot = value.lastIndexOf(".");
  if (dot <= 0 || !/^[A-Za-z0-9+/=]+$/.test(value.slice(0, dot)) || !/^[A-Za-z0-9+/]+$/.test(value.slice(dot + 1))) return undefined;
  const payload = value.slice(0, dot);
  const given = Buffer.from(value.slice(dot + 1), "base64");
  const ok = keys.some((key) => {
    const expected = createHmac("sha256", key).update(payload).digest();
    return expected.length === given.length && timingSafeEqual(expected, given);
  });
  if (!ok) return null;
  let id: unknown;
  try {
    id = JSON.parse(Buffer.from(payload, "base64").toString("latin1"));
  } catch {
    return undefined;
  }
  return typeof id === "string" && /^[A-Za-z0-9_-]{16,128}$/.test(id) ? id : undefined;
}

/** Signed cookie values remembered as checked, per session storage (about 200 bytes each). */
const VERIFIED_COOKIES_MAX = 4096;

/** Session storage that can also read the signed-in person behind a Cookie header in one query. */
export type DbSessionStorage = SessionStorage<SessionData> & {
  /** The person whose live session the Cookie header carries, or null: one signature check and one query. */
  readUser(cookieHeader: string | null): Promise<User | null>;
  /** The table key (hashed id) of the session a Cookie header carries, signature checked; null when it carries none. */
  sessionKey(cookieHeader: string | null): Promise<string | null>;
};

export function createDbSessionStorage(database: Db, options: { secrets: string[]; secure: boolean }): DbSessionStorage {
  const cookie = createCookie(options.secure ? "__Host-skewsmith" : "skewsmith_session", {
    httpOnly: true,
    sameSite: "lax",
    secure: options.secure,
    path: "/",
    maxAge: SESSION_MAX_AGE,
    secrets: options.secrets,
  });
  const expiry = (expires?: Date) => expires ?? new Date(Date.now() + SESSION_MAX_AGE * 1000);
  // The hottest query of the app (every signed-in request): prepared once per connection.
  const userBySession = database
    .select({ user: users })
    .from(sessions)
    .innerJoin(users, eq(users.id, sessions.userId))
    .where(and(eq(sessions.idHash, sql.placeholder("idHash")), gt(sessions.expiresAt, sql`now()`)))
    .prepare("skewsmith_user_by_session");
  const storage = createSessionStorage<SessionData>({
    cookie,
    async createData(data, expires) {
      const id = randomBytes(32).toString("base64url");
      await database.delete(sessions).where(lt(sessions.expiresAt, new Date()));
      await database.insert(sessions).values({
        idHash: hashSessionId(id),
        userId: typeof data.userId === "string" ? data.userId : null,
        data,
        expiresAt: expiry(expires),
      });
      return id;
    },
    async readData(id) {
      const [row] = await database
        .select()
        .from(sessions)
        .where(eq(sessions.idHash, hashSessionId(id)));
      if (!row) return null;
      if (row.expiresAt.getTime() <= Date.now()) {
        await database.delete(sessions).where(eq(sessions.idHash, row.idHash));
        return null;
      }
      return row.data as unknown as SessionData;
    },
    async updateData(id, data, expires) {
      // Update only: a session ended on the server (signed out, expired) is never brought back by an old cookie.
      await database
        .update(sessions)
        .set({ data, userId: typeof data.userId === "string" ? data.userId : null, expiresAt: expiry(expires) })
        .where(eq(sessions.idHash, hashSessionId(id)));
    },
    async deleteData(id) {
      await database.delete(sessions).where(eq(sessions.idHash, hashSessionId(id)));
    },
  });
  const keys = options.secrets.map((secret) => Buffer.from(secret, "utf8"));
  // Cookie values whose signature checked out, with their table key: a signed-in person's next requests skip the HMAC
  // and the hash (the secrets do not change while the process runs; whether the session is still live is the
  // query's to say). Bounded, the oldest first out.
  const verified = new Map<string, string>();
  async function sessionKey(cookieHeader: string | null): Promise<string | null> {
    if (!cookieHeader) return null;
    const raw = cookieValue(cookieHeader, cookie.name);
    const known = raw === undefined ? undefined : verified.get(raw);
    if (known !== undefined) return known;
    const fast = raw === undefined ? undefined : verifiedValue(raw, keys);
    if (fast === null) return null; // a bad signature
    const id: unknown = fast ?? (await cookie.parse(cookieHeader));
    if (typeof id !== "string" || id.length === 0) return null;
    const idHash = hashSessionId(id);
    if (fast !== undefined && raw !== undefined) {
      verified.set(raw, idHash);
      if (verified.size > VERIFIED_COOKIES_MAX) verified.delete(verified.keys().next().value!);
    }
    return idHash;
  }
  async function readUser(cookieHeader: string | null): Promise<User | null> {
    const idHash = await sessionKey(cookieHeader);
    if (idHash === null) return null;
    const [row] = await userBySession.execute({ idHash });
    return row?.user ?? null;
  }
  return Object.assign(storage, { readUser, sessionKey });
}

let storage: DbSessionStorage | undefined;

/** The app's session storage, created on first use. */
export function sessionStorage(): DbSessionStorage {
  storage ??= createDbSessionStorage(db(), { secrets: [env().SESSION_SECRET], secure: env().secureCookies });
  return storage;
}
