// Applies the committed migrations in drizzle/ to DATABASE_URL (idempotent: applied ones are skipped).
import path from "node:path";
import { fileURLToPath } from "node:url";
import { migrate } from "drizzle-orm/node-postgres/migrator";
import { createDb } from "../../app/db/client.server.ts";

const url = process.env.DATABASE_URL;
if (!url) {
  console.error("db:migrate: DATABASE_URL is not set (scripts/start and scripts/test set it)");
  process.exit(1);
}
const migrationsFolder = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../../drizzle");
const db = createDb(url, { max: 1 });
try {
  await migrate(db, { migrationsFolder });
  console.error("db:migrate: schema is up to date");
} finally {
  await db.$client.end();
}
