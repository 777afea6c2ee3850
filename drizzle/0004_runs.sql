CREATE TABLE "run_steps" (
	"id" bigserial PRIMARY KEY NOT NULL,
	"run_id" uuid NOT NULL,
	"seq" integer NOT NULL,
	"step_id" text NOT NULL,
	"kind" text NOT NULL,
	"answer" jsonb NOT NULL,
	"notes" text DEFAULT '' NOT NULL,
	"actor_id" uuid,
	"entered_at" timestamp with time zone NOT NULL,
	"answered_at" timestamp with time zone DEFAULT now() NOT NULL,
	"superseded_at" timestamp with time zone,
	"idempotency_key" text NOT NULL,
	"result" jsonb NOT NULL
);
--> statement-breakpoint
CREATE TABLE "runs" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"job_id" uuid NOT NULL,
	"flow_version_id" uuid NOT NULL,
	"technician_id" uuid NOT NULL,
	"status" text DEFAULT 'in-progress' NOT NULL,
	"snapshot" jsonb NOT NULL,
	"current_step" text NOT NULL,
	"verdict_code" text,
	"verdict_step" text,
	"data_reachable" boolean,
	"abandon_reason" text,
	"started_at" timestamp with time zone DEFAULT now() NOT NULL,
	"finished_at" timestamp with time zone,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "runs_status_check" CHECK ("runs"."status" in ('in-progress', 'completed', 'abandoned')),
	CONSTRAINT "runs_verdict_check" CHECK (("runs"."status" = 'completed') = ("runs"."verdict_code" is not null))
);
--> statement-breakpoint
ALTER TABLE "run_steps" ADD CONSTRAINT "run_steps_run_id_runs_id_fk" FOREIGN KEY ("run_id") REFERENCES "public"."runs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "run_steps" ADD CONSTRAINT "run_steps_actor_id_users_id_fk" FOREIGN KEY ("actor_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_job_id_jobs_id_fk" FOREIGN KEY ("job_id") REFERENCES "public"."jobs"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_flow_version_id_flow_versions_id_fk" FOREIGN KEY ("flow_version_id") REFERENCES "public"."flow_versions"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "runs" ADD CONSTRAINT "runs_technician_id_users_id_fk" FOREIGN KEY ("technician_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "run_steps_run_seq_idx" ON "run_steps" USING btree ("run_id","seq");--> statement-breakpoint
CREATE UNIQUE INDEX "run_steps_run_key_idx" ON "run_steps" USING btree ("run_id","idempotency_key");--> statement-breakpoint
CREATE INDEX "runs_job_idx" ON "runs" USING btree ("job_id","started_at");--> statement-breakpoint
CREATE INDEX "runs_flow_version_idx" ON "runs" USING btree ("flow_version_id");