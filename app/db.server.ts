import { createDb, type Db } from "./db/client.server.ts";
import { env } from "./env.server.ts";

export type { Db } from "./db/client.server.ts";

const globalForDb = globalThis as unknown as { skewsmithDb?: Db };

/** The app's one database client, created on first use and kept across development reloads. */
export function db(): Db {
  globalForDb.skewsmithDb ??= createDb(env().DATABASE_URL);
  return globalForDb.skewsmithDb;
}
