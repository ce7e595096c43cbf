CREATE TABLE "follows" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"user_id" text NOT NULL,
	"subject_type" text NOT NULL,
	"subject_id" text NOT NULL,
	"token" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "follows_token_unique" UNIQUE("token")
);
--> statement-breakpoint
ALTER TABLE "entries" ADD COLUMN "problems" jsonb;--> statement-breakpoint
ALTER TABLE "entries" ADD COLUMN "idempotency_key" text;--> statement-breakpoint
ALTER TABLE "entries" ADD COLUMN "idempotency_hash" text;--> statement-breakpoint
ALTER TABLE "follows" ADD CONSTRAINT "follows_user_id_user_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."user"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "follows_user_subject_uq" ON "follows" USING btree ("user_id","subject_type","subject_id");--> statement-breakpoint
CREATE INDEX "follows_subject_idx" ON "follows" USING btree ("subject_type","subject_id");--> statement-breakpoint
CREATE UNIQUE INDEX "entries_idempotency_uq" ON "entries" USING btree ("team_id","idempotency_key");