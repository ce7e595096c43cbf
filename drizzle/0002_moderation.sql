CREATE TABLE "entry_commitments" (
	"entry_id" uuid PRIMARY KEY NOT NULL,
	"sha256" text NOT NULL,
	"registered_at" timestamp with time zone NOT NULL,
	"registered_by" text NOT NULL,
	"result" text DEFAULT 'pending' NOT NULL,
	"computed_sha256" text,
	"checked_at" timestamp with time zone
);
--> statement-breakpoint
CREATE TABLE "reference_seals" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"version_id" uuid NOT NULL,
	"challenge_slug" text NOT NULL,
	"all_targets" boolean DEFAULT false NOT NULL,
	"target_keys" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"sealed_until" timestamp with time zone NOT NULL,
	"created_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"revealed_at" timestamp with time zone
);
--> statement-breakpoint
ALTER TABLE "entry_commitments" ADD CONSTRAINT "entry_commitments_entry_id_entries_id_fk" FOREIGN KEY ("entry_id") REFERENCES "public"."entries"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "reference_seals" ADD CONSTRAINT "reference_seals_version_id_challenge_versions_id_fk" FOREIGN KEY ("version_id") REFERENCES "public"."challenge_versions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "reference_seals_version_idx" ON "reference_seals" USING btree ("version_id");--> statement-breakpoint
CREATE INDEX "reference_seals_due_idx" ON "reference_seals" USING btree ("revealed_at","sealed_until");