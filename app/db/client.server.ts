import { createHash } from "node:crypto";
import { drizzle, type NodePgDatabase } from "drizzle-orm/node-postgres";
import pg from "pg";
import { log } from "../log.server.ts";
import * as schema from "./schema.ts";

/** A Drizzle client over a pg pool, with the schema for relational queries. */
export type Db = NodePgDatabase<typeof schema> & { $client: pg.Pool };

const statementNames = new Map<string, string>();

/** A stable statement name for a query's text (bounded: beyond 2000 shapes, new ones run unnamed). */
function statementName(text: string): string | undefined {
  let name = statementNames.get(text);
  if (name === undefined && statementNames.size < 2000 && text.length < 8000) {
    name = `s_${createHash("sha1").update(text).digest("hex")}`;
    statementNames.set(text, name);
  }
  return name;
}

type QueryFn = (...args: unknown[]) => unknown;

/**
 * Makes every query a named prepared statement: PostgreSQL then parses and plans each distinct query once per
 * connection instead of on every request (the app's queries come in a few hundred fixed shapes). Queries that name
 * themselves (Drizzle's `.prepare()`) keep their name.
 */
function nameStatements(target: { query: QueryFn }): void {
  const query = target.query.bind(target);
  target.query = (config: unknown, ...rest: unknown[]) => {
    if (
      config &&
      typeof config === "object" &&
      typeof (config as { text?: unknown }).text === "string" &&
      !(config as { name?: unknown }).name
    ) {
      const name = statementName((config as { text: string }).text);
      if (name) return query({ ...(config as object), name }, ...rest);
    }
    return query(config, ...rest);
  };
}

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
  nameStatements(pool as unknown as { query: QueryFn });
  pool.on("connect", (client) => nameStatements(client as unknown as { query: QueryFn }));
  return drizzle(pool, { schema, casing: "snake_case" });
}

/** A client or an open transaction: data functions accept either, so callers can group them. */
export type Tx = Db | Parameters<Parameters<Db["transaction"]>[0]>[0];

const preparedQueries = new WeakMap<object, Map<string, unknown>>();

/**
 * A query of `db` made and prepared once under `name` (`make` ends in Drizzle's `.prepare(name)` with placeholders):
 * Drizzle then builds its SQL once instead of on every call, and PostgreSQL plans it once per connection. For the
 * queries every page runs; a transaction gets its own.
 */
export function preparedOnce<T>(db: Tx, name: string, make: (db: Tx) => T): T {
  let byName = preparedQueries.get(db);
  if (!byName) preparedQueries.set(db, (byName = new Map()));
  let query = byName.get(name) as T | undefined;
  if (query === undefined) byName.set(name, (query = make(db)));
  return query;
}
