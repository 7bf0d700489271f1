ALTER TABLE "effects" ADD COLUMN "description" text DEFAULT '' NOT NULL;--> statement-breakpoint
-- Sprite names become unique in a project (case-insensitive); any older duplicates get a number first.
UPDATE "sprites" SET "name" = "sprites"."name" || ' (' || d.n || ')' FROM (SELECT "id", row_number() OVER (PARTITION BY "project_id", lower("name") ORDER BY "created_at", "id") AS n FROM "sprites") d WHERE d."id" = "sprites"."id" AND d.n > 1;--> statement-breakpoint
CREATE UNIQUE INDEX "sprites_project_name_key" ON "sprites" USING btree ("project_id",lower("name"));