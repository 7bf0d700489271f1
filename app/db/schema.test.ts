import { sql } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { testDb } from "../../tests/support/db.ts";

const db = testDb();
afterAll(() => db.$client.end());

const PRODUCT_TABLES = [
  "users",
  "sessions",
  "teams",
  "memberships",
  "invitations",
  "projects",
  "target_profiles",
  "effects",
  "sprites",
  "api_tokens",
  "activity",
];

describe("the migrated schema", () => {
  it("has every table the product names, each with created and updated timestamps (with time zone)", async () => {
    const { rows } = await db.execute<{ table_name: string; column_name: string; data_type: string }>(sql`
      select table_name, column_name, data_type from information_schema.columns
      where table_schema = 'public' and column_name in ('created_at', 'updated_at')`);
    for (const table of PRODUCT_TABLES)
      for (const column of ["created_at", "updated_at"])
        expect(rows, `${table}.${column}`).toContainEqual({
          table_name: table,
          column_name: column,
          data_type: "timestamp with time zone",
        });
  });

  it("keeps roles in a PostgreSQL enum of owner, editor, viewer", async () => {
    const { rows } = await db.execute<{ label: string }>(sql`
      select e.enumlabel as label from pg_enum e join pg_type t on t.oid = e.enumtypid where t.typname = 'role' order by e.enumsortorder`);
    expect(rows.map((r) => r.label)).toEqual(["owner", "editor", "viewer"]);
    await expect(db.execute(sql`select 'admin'::role`)).rejects.toThrow();
  });

  it("stores the effect document as jsonb with a version number, and sprites as bytes", async () => {
    const { rows } = await db.execute<{ table_name: string; column_name: string; data_type: string }>(sql`
      select table_name, column_name, data_type from information_schema.columns
      where (table_name, column_name) in (('effects', 'document'), ('effects', 'version'), ('sprites', 'png'))
      order by table_name, column_name`);
    expect(rows).toEqual([
      { table_name: "effects", column_name: "document", data_type: "jsonb" },
      { table_name: "effects", column_name: "version", data_type: "integer" },
      { table_name: "sprites", column_name: "png", data_type: "bytea" },
    ]);
  });
});
