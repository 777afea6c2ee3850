CREATE TABLE "backup_runs" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"trigger" text NOT NULL,
	"status" text NOT NULL,
	"started_at" timestamp with time zone NOT NULL,
	"finished_at" timestamp with time zone DEFAULT now() NOT NULL,
	"file" text,
	"bytes" bigint,
	"method" text,
	"photos" integer,
	"error" text,
	CONSTRAINT "backup_runs_trigger_check" CHECK ("backup_runs"."trigger" in ('schedule', 'command', 'lead')),
	CONSTRAINT "backup_runs_status_check" CHECK ("backup_runs"."status" in ('succeeded', 'failed'))
);
--> statement-breakpoint
CREATE INDEX "backup_runs_finished_idx" ON "backup_runs" USING btree ("finished_at");