import { defineConfig } from "drizzle-kit";

// `db:generate` needs no database; `db:migrate` runs scripts/db/migrate.ts (the same migrator the start command uses).
export default defineConfig({
  dialect: "postgresql",
  schema: "./app/db/schema.ts",
  out: "./drizzle",
  casing: "snake_case",
  dbCredentials: { url: process.env.DATABASE_URL ?? "" },
});
