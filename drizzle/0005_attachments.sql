CREATE TABLE "attachments" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"job_id" uuid NOT NULL,
	"run_id" uuid,
	"step_id" text,
	"run_step_id" bigint,
	"kind" text DEFAULT 'photo' NOT NULL,
	"source" text NOT NULL,
	"caption" text DEFAULT '' NOT NULL,
	"sha256" text NOT NULL,
	"original_key" text NOT NULL,
	"display_key" text NOT NULL,
	"thumb_key" text NOT NULL,
	"mime" text NOT NULL,
	"width" integer NOT NULL,
	"height" integer NOT NULL,
	"bytes" integer NOT NULL,
	"uploaded_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"shown_to_customer" boolean DEFAULT false NOT NULL,
	CONSTRAINT "attachments_kind_check" CHECK ("attachments"."kind" in ('photo')),
	CONSTRAINT "attachments_source_check" CHECK (source in ('phone', 'microscope')),
	CONSTRAINT "attachments_step_needs_run_check" CHECK ("attachments"."step_id" is null or "attachments"."run_id" is not null),
	CONSTRAINT "attachments_keys_check" CHECK ("attachments"."original_key" ~ '^[0-9a-f]{64}$' and "attachments"."display_key" ~ '^[0-9a-f]{64}$' and "attachments"."thumb_key" ~ '^[0-9a-f]{64}$')
);
--> statement-breakpoint
ALTER TABLE "attachments" ADD CONSTRAINT "attachments_job_id_jobs_id_fk" FOREIGN KEY ("job_id") REFERENCES "public"."jobs"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "attachments" ADD CONSTRAINT "attachments_run_id_runs_id_fk" FOREIGN KEY ("run_id") REFERENCES "public"."runs"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "attachments" ADD CONSTRAINT "attachments_run_step_id_run_steps_id_fk" FOREIGN KEY ("run_step_id") REFERENCES "public"."run_steps"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "attachments" ADD CONSTRAINT "attachments_uploaded_by_users_id_fk" FOREIGN KEY ("uploaded_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "attachments_job_idx" ON "attachments" USING btree ("job_id","created_at");--> statement-breakpoint
CREATE INDEX "attachments_job_sha256_idx" ON "attachments" USING btree ("job_id","sha256");--> statement-breakpoint
CREATE INDEX "attachments_run_idx" ON "attachments" USING btree ("run_id","step_id");--> statement-breakpoint
CREATE INDEX "attachments_original_key_idx" ON "attachments" USING btree ("original_key");--> statement-breakpoint
CREATE INDEX "attachments_display_key_idx" ON "attachments" USING btree ("display_key");--> statement-breakpoint
CREATE INDEX "attachments_thumb_key_idx" ON "attachments" USING btree ("thumb_key");