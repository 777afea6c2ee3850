ALTER TABLE "jobs" ADD COLUMN "data_outcome" text;--> statement-breakpoint
ALTER TABLE "jobs" ADD COLUMN "data_note" text DEFAULT '' NOT NULL;--> statement-breakpoint
ALTER TABLE "jobs" ADD COLUMN "data_recorded_by" uuid;--> statement-breakpoint
ALTER TABLE "jobs" ADD COLUMN "data_recorded_at" timestamp with time zone;--> statement-breakpoint
ALTER TABLE "jobs" ADD CONSTRAINT "jobs_data_recorded_by_users_id_fk" FOREIGN KEY ("data_recorded_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "jobs" ADD CONSTRAINT "jobs_data_outcome_check" CHECK (data_outcome is null or (data_outcome in ('backed-up', 'declined', 'not-possible') and data_recorded_at is not null));