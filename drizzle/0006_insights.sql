CREATE TABLE "insight_run_facts" (
	"run_id" uuid PRIMARY KEY NOT NULL,
	"seq" bigserial NOT NULL,
	"job_id" uuid NOT NULL,
	"flow_id" text NOT NULL,
	"version" integer NOT NULL,
	"status" text NOT NULL,
	"verdict_code" text,
	"device_model" text NOT NULL,
	"technician_id" uuid NOT NULL,
	"started_at" timestamp with time zone NOT NULL,
	"finished_at" timestamp with time zone NOT NULL,
	"duration_s" integer NOT NULL,
	"step_ids" text[] NOT NULL,
	"outcomes" integer[] NOT NULL,
	"dwell_s" integer[] NOT NULL,
	"abandon_reason" text,
	"abandon_step" text,
	"confirmed" boolean,
	"confirmation_note" text,
	"confirmed_at" timestamp with time zone,
	CONSTRAINT "insight_run_facts_status_check" CHECK ("insight_run_facts"."status" in ('completed', 'abandoned'))
);
--> statement-breakpoint
CREATE TABLE "verdict_confirmations" (
	"id" bigserial PRIMARY KEY NOT NULL,
	"run_id" uuid NOT NULL,
	"confirmed" boolean NOT NULL,
	"note" text DEFAULT '' NOT NULL,
	"by" uuid,
	"at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "insight_run_facts" ADD CONSTRAINT "insight_run_facts_run_id_runs_id_fk" FOREIGN KEY ("run_id") REFERENCES "public"."runs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "verdict_confirmations" ADD CONSTRAINT "verdict_confirmations_run_id_runs_id_fk" FOREIGN KEY ("run_id") REFERENCES "public"."runs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "verdict_confirmations" ADD CONSTRAINT "verdict_confirmations_by_users_id_fk" FOREIGN KEY ("by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "insight_run_facts_seq_idx" ON "insight_run_facts" USING btree ("seq");--> statement-breakpoint
CREATE INDEX "insight_run_facts_finished_idx" ON "insight_run_facts" USING btree ("finished_at");--> statement-breakpoint
CREATE INDEX "verdict_confirmations_run_idx" ON "verdict_confirmations" USING btree ("run_id","at");