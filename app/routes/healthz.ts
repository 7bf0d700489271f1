import { sql } from "drizzle-orm";
import { db } from "../db.server.ts";

/** Liveness for the start and test commands: answers 200 once the app can reach its database. */
export async function loader() {
  await db().execute(sql`select 1`);
  return new Response("ok\n", { headers: { "Content-Type": "text/plain", "Cache-Control": "no-store" } });
}
