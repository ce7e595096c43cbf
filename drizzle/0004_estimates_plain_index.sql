DROP INDEX "estimate_target_uq";--> statement-breakpoint
CREATE INDEX "estimates_entry_idx" ON "estimates" USING btree ("entry_id");