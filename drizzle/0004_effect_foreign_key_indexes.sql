CREATE INDEX "effects_target_profile_id_index" ON "effects" USING btree ("target_profile_id");--> statement-breakpoint
CREATE INDEX "effects_sprite_id_index" ON "effects" USING btree ("sprite_id");