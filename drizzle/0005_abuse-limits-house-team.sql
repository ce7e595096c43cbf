CREATE TABLE "mail_quota" (
	"id" bigserial PRIMARY KEY NOT NULL,
	"kind" text NOT NULL,
	"sender_id" text NOT NULL,
	"recipient" text NOT NULL,
	"at" timestamp with time zone NOT NULL
);
--> statement-breakpoint
CREATE TABLE "sign_in_failures" (
	"key" text PRIMARY KEY NOT NULL,
	"failures" integer DEFAULT 0 NOT NULL,
	"last_failure_at" timestamp with time zone NOT NULL,
	"blocked_until" timestamp with time zone
);
--> statement-breakpoint
ALTER TABLE "apikey" ADD COLUMN "created_by" text;--> statement-breakpoint
ALTER TABLE "jobs" ADD COLUMN "error_detail" text;--> statement-breakpoint
CREATE INDEX "mail_quota_sender_idx" ON "mail_quota" USING btree ("kind","sender_id","at");--> statement-breakpoint
CREATE INDEX "mail_quota_recipient_idx" ON "mail_quota" USING btree ("kind","recipient","at");--> statement-breakpoint
ALTER TABLE "apikey" ADD CONSTRAINT "apikey_created_by_user_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."user"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "apikey_created_by_idx" ON "apikey" USING btree ("created_by");--> statement-breakpoint
-- The house team is part of the schema (issue 12 item 7): the baseline job no longer creates it, so
-- a user can never take its slug first. A team that already took the slug keeps its id and gets a
-- suffixed slug. The values match HOUSE_TEAM in server/jobs/worker.ts (tests/server/security-auth.test.ts).
UPDATE "organization" SET "slug" = "slug" || '-' || substr("id", 1, 8) WHERE "slug" = 'parallax-house' AND "id" <> 'parallax-house';--> statement-breakpoint
INSERT INTO "organization" ("id", "name", "slug", "metadata") VALUES ('parallax-house', 'Parallax house baseline', 'parallax-house', '{"track":"classical","description":"The built-in classical baseline that Parallax computes for every challenge."}') ON CONFLICT ("id") DO NOTHING;
