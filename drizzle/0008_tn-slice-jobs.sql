CREATE TABLE "tn_slice_parts" (
	"run_id" uuid NOT NULL,
	"term" integer NOT NULL,
	"slice_start" integer NOT NULL,
	"slice_end" integer NOT NULL,
	"partials" jsonb NOT NULL,
	"wall_ms" double precision NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "tn_slice_runs" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"parent_job_id" uuid NOT NULL,
	"version_id" uuid NOT NULL,
	"target_key" text NOT NULL,
	"terms" jsonb NOT NULL,
	"parts" integer NOT NULL,
	"template" jsonb NOT NULL,
	"state" text DEFAULT 'pending' NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"combined_at" timestamp with time zone
);
--> statement-breakpoint
ALTER TABLE "tn_slice_parts" ADD CONSTRAINT "tn_slice_parts_run_id_tn_slice_runs_id_fk" FOREIGN KEY ("run_id") REFERENCES "public"."tn_slice_runs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "tn_slice_runs" ADD CONSTRAINT "tn_slice_runs_parent_job_id_jobs_id_fk" FOREIGN KEY ("parent_job_id") REFERENCES "public"."jobs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "tn_slice_runs" ADD CONSTRAINT "tn_slice_runs_version_id_challenge_versions_id_fk" FOREIGN KEY ("version_id") REFERENCES "public"."challenge_versions"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "tn_slice_parts_range" ON "tn_slice_parts" USING btree ("run_id","term","slice_start","slice_end");--> statement-breakpoint
CREATE UNIQUE INDEX "tn_slice_runs_job_target" ON "tn_slice_runs" USING btree ("parent_job_id","target_key");