CREATE TYPE "public"."sprite_kind" AS ENUM('indexed', 'rgba');--> statement-breakpoint
CREATE TYPE "public"."token_scope" AS ENUM('read', 'write');--> statement-breakpoint
ALTER TABLE "api_tokens" ADD COLUMN "scope" "token_scope" DEFAULT 'read' NOT NULL;--> statement-breakpoint
ALTER TABLE "api_tokens" ADD COLUMN "revoked_at" timestamp with time zone;--> statement-breakpoint
ALTER TABLE "effects" ADD COLUMN "follows_profile" boolean DEFAULT true NOT NULL;--> statement-breakpoint
ALTER TABLE "effects" ADD COLUMN "sprite_x" integer;--> statement-breakpoint
ALTER TABLE "effects" ADD COLUMN "sprite_y" integer;--> statement-breakpoint
ALTER TABLE "effects" ADD COLUMN "key_pixels" jsonb DEFAULT '[]'::jsonb NOT NULL;--> statement-breakpoint
ALTER TABLE "invitations" ADD COLUMN "last_sent_at" timestamp with time zone;--> statement-breakpoint
ALTER TABLE "invitations" ADD COLUMN "accepted_by" uuid;--> statement-breakpoint
ALTER TABLE "invitations" ADD COLUMN "revoked_at" timestamp with time zone;--> statement-breakpoint
ALTER TABLE "projects" ADD COLUMN "version" integer DEFAULT 1 NOT NULL;--> statement-breakpoint
ALTER TABLE "sprites" ADD COLUMN "kind" "sprite_kind" DEFAULT 'indexed' NOT NULL;--> statement-breakpoint
ALTER TABLE "sprites" ADD COLUMN "byte_size" integer DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE "sprites" ADD COLUMN "version" integer DEFAULT 1 NOT NULL;--> statement-breakpoint
ALTER TABLE "target_profiles" ADD COLUMN "export_options" jsonb DEFAULT '{}'::jsonb NOT NULL;--> statement-breakpoint
ALTER TABLE "target_profiles" ADD COLUMN "version" integer DEFAULT 1 NOT NULL;--> statement-breakpoint
ALTER TABLE "teams" ADD COLUMN "version" integer DEFAULT 1 NOT NULL;--> statement-breakpoint
ALTER TABLE "invitations" ADD CONSTRAINT "invitations_accepted_by_users_id_fk" FOREIGN KEY ("accepted_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
UPDATE "sprites" SET "byte_size" = octet_length("png");