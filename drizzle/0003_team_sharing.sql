CREATE TABLE "effect_profile_changes" (
	"effect_id" uuid PRIMARY KEY NOT NULL,
	"target_profile_id" uuid,
	"profile_name" text NOT NULL,
	"profile_version" integer NOT NULL,
	"effect_version" integer NOT NULL,
	"changes" jsonb NOT NULL,
	"changed_by" uuid,
	"changed_at" timestamp with time zone DEFAULT now() NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "effect_profile_changes" ADD CONSTRAINT "effect_profile_changes_effect_id_effects_id_fk" FOREIGN KEY ("effect_id") REFERENCES "public"."effects"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "effect_profile_changes" ADD CONSTRAINT "effect_profile_changes_target_profile_id_target_profiles_id_fk" FOREIGN KEY ("target_profile_id") REFERENCES "public"."target_profiles"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "effect_profile_changes" ADD CONSTRAINT "effect_profile_changes_changed_by_users_id_fk" FOREIGN KEY ("changed_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "invitations_team_open_email_key" ON "invitations" USING btree ("team_id",lower("email")) WHERE "invitations"."accepted_at" is null and "invitations"."revoked_at" is null;--> statement-breakpoint
-- Export dialects are core's output names from now on (c, 6502, 68k, arm, z80, bin, json, runtime); earlier free-text names are mapped or dropped.
UPDATE "target_profiles" SET "dialects" = coalesce((
  SELECT array_agg(DISTINCT m) FROM (
    SELECT CASE lower(d) WHEN 'ca65' THEN '6502' WHEN 'c99' THEN 'c' WHEN 'm68k' THEN '68k' WHEN 'sm83' THEN 'z80' ELSE lower(d) END AS m
    FROM unnest("dialects") AS d
  ) mapped
  WHERE m IN ('c', '6502', '68k', 'arm', 'z80', 'bin', 'json', 'runtime')
), '{}');--> statement-breakpoint
-- A label prefix is core's label form (a letter first, no trailing "_", no "__"); one that cannot be fixed by trimming is cleared.
UPDATE "target_profiles" SET "label_prefix" = rtrim("label_prefix", '_');--> statement-breakpoint
UPDATE "target_profiles" SET "label_prefix" = '' WHERE "label_prefix" !~ '^[A-Za-z][A-Za-z0-9_]{0,22}$' OR "label_prefix" LIKE '%\_\_%';
