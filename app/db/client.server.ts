import { drizzle, type NodePgDatabase } from "drizzle-orm/node-postgres";
import pg from "pg";
import { log } from "../log.server.ts";
import * as schema from "./schema.ts";

/** A Drizzle client over a pg pool, with the schema for relational queries. */
export type Db = NodePgDatabase<typeof schema> & { $client: pg.Pool };

/** Opens a pool to DATABASE_URL; call `db.$client.end()` when done (scripts and tests). */
export function createDb(url: string, options: { max?: number } = {}): Db {
  const pool = new pg.Pool({
    connectionString: url,
    max: options.max ?? 10,
    // A database that does not answer a connection attempt (a network that drops packets) fails the request in
    // seconds, as a 503, instead of holding it until the client gives up.
    connectionTimeoutMillis: 5_000,
    // Lets the server process exit on SIGTERM once its HTTP server has closed.
    allowExitOnIdle: true,
  });
  // An idle connection that drops (a database restart, say) must not crash the process; the pool reconnects.
  pool.on("error", (error) => log("warn", "database connection lost", { detail: error.message }));
  return drizzle(pool, { schema, casing: "snake_case" });
}

/** A client or an open transaction: data functions accept either, so callers can group them. */
export type Tx = Db | Parameters<Parameters<Db["transaction"]>[0]>[0];
