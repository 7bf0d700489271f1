import path from "node:path";
import { fileURLToPath } from "node:url";
import { migrate } from "drizzle-orm/node-postgres/migrator";
import pg from "pg";
import { createDb, type Db } from "../../app/db/client.server.ts";

export const MIGRATIONS = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../../drizzle");

/** The URL of this run's test database (scripts/test creates a fresh one and migrates it). */
export function testDatabaseUrl(): string {
  const url = process.env.DATABASE_URL;
  if (!url)
    throw new Error(
      "DATABASE_URL is not set. Run the tests with scripts/test: it starts PostgreSQL and creates a fresh database for the run.",
    );
  return url;
}

/** A client on this run's test database; close it with `db.$client.end()`. */
export function testDb(): Db {
  return createDb(testDatabaseUrl(), { max: 4 });
}

/** Runs `work` against a brand-new, migrated database on the same server, then drops it. */
export async function withFreshDatabase<T>(work: (db: Db, url: string) => Promise<T>): Promise<T> {
  const base = new URL(testDatabaseUrl());
  const name = `skewsmith_scratch_${Date.now().toString(36)}_${Math.floor(Math.random() * 1e6)}`;
  const admin = new pg.Client({ connectionString: Object.assign(new URL(base), { pathname: "/postgres" }).toString() });
  await admin.connect();
  try {
    await admin.query(`create database "${name}"`);
    const url = Object.assign(new URL(base), { pathname: `/${name}` }).toString();
    const db = createDb(url, { max: 2 });
    try {
      await migrate(db, { migrationsFolder: MIGRATIONS });
      return await work(db, url);
    } finally {
      await db.$client.end();
    }
  } finally {
    // pool.end() can return while the server still closes the last session; wait for it rather than cutting it off.
    for (let i = 0; i < 50; i++) {
      const { rows } = await admin.query("select count(*)::int as n from pg_stat_activity where datname = $1", [name]);
      if (rows[0].n === 0) break;
      await new Promise((r) => setTimeout(r, 50));
    }
    await admin.query(`drop database if exists "${name}" with (force)`);
    await admin.end();
  }
}

/** A brand-new, migrated database on the test server for a test that needs one of its own; `drop()` removes it. */
export async function createScratchDatabase(prefix = "skewsmith_scratch"): Promise<{ url: string; drop(): Promise<void> }> {
  const base = new URL(testDatabaseUrl());
  const name = `${prefix}_${Date.now().toString(36)}_${Math.floor(Math.random() * 1e6)}`;
  const adminUrl = Object.assign(new URL(base), { pathname: "/postgres" }).toString();
  const admin = new pg.Client({ connectionString: adminUrl });
  await admin.connect();
  try {
    await admin.query(`create database "${name}"`);
  } finally {
    await admin.end();
  }
  const url = Object.assign(new URL(base), { pathname: `/${name}` }).toString();
  const db = createDb(url, { max: 1 });
  try {
    await migrate(db, { migrationsFolder: MIGRATIONS });
  } finally {
    await db.$client.end();
  }
  return {
    url,
    async drop() {
      const client = new pg.Client({ connectionString: adminUrl });
      await client.connect();
      try {
        await client.query(`drop database if exists "${name}" with (force)`);
      } finally {
        await client.end();
      }
    },
  };
}
