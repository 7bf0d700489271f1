import { createHash, randomBytes } from "node:crypto";
import { eq, lt } from "drizzle-orm";
import { createCookie, createSessionStorage, type SessionStorage } from "react-router";
import type { Db } from "./db/client.server.ts";
import { sessions } from "./db/schema.ts";
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
export function createDbSessionStorage(database: Db, options: { secrets: string[]; secure: boolean }): SessionStorage<SessionData> {
  const cookie = createCookie(options.secure ? "__Host-skewsmith" : "skewsmith_session", {
    httpOnly: true,
    sameSite: "lax",
    secure: options.secure,
    path: "/",
    maxAge: SESSION_MAX_AGE,
    secrets: options.secrets,
  });
  const expiry = (expires?: Date) => expires ?? new Date(Date.now() + SESSION_MAX_AGE * 1000);
  return createSessionStorage<SessionData>({
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
}

let storage: SessionStorage<SessionData> | undefined;

/** The app's session storage, created on first use. */
export function sessionStorage(): SessionStorage<SessionData> {
  storage ??= createDbSessionStorage(db(), { secrets: [env().SESSION_SECRET], secure: env().secureCookies });
  return storage;
}
