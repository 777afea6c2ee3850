CREATE TYPE "public"."liquid_kind" AS ENUM('fresh', 'salt', 'chlorinated', 'sugary', 'other', 'unknown');--> statement-breakpoint
CREATE TYPE "public"."passcode_status" AS ENUM('given', 'withheld', 'not-needed');--> statement-breakpoint
CREATE SEQUENCE "public"."job_number_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 9223372036854775807 START WITH 1 CACHE 1;--> statement-breakpoint
CREATE TABLE "customers" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"name" text NOT NULL,
	"email" text,
	"phone" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "customers_contact_check" CHECK ("customers"."email" is not null or "customers"."phone" is not null)
);
--> statement-breakpoint
CREATE TABLE "device_models" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"maker" text NOT NULL,
	"model" text NOT NULL
);
--> statement-breakpoint
CREATE TABLE "job_events" (
	"id" bigserial PRIMARY KEY NOT NULL,
	"job_id" uuid NOT NULL,
	"from_status" text,
	"to_status" text NOT NULL,
	"by" uuid,
	"at" timestamp with time zone DEFAULT now() NOT NULL,
	"note" text DEFAULT '' NOT NULL
);
--> statement-breakpoint
CREATE TABLE "jobs" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"number" integer DEFAULT nextval('job_number_seq') NOT NULL,
	"customer_id" uuid NOT NULL,
	"maker" text NOT NULL,
	"model" text NOT NULL,
	"imei" text,
	"serial" text,
	"symptoms" text[] DEFAULT '{}'::text[] NOT NULL,
	"liquid" "liquid_kind" NOT NULL,
	"exposed_at" timestamp with time zone,
	"submerged" boolean NOT NULL,
	"depth_m" real,
	"minutes" real,
	"rating" jsonb NOT NULL,
	"exposure_assessment" jsonb NOT NULL,
	"data_first" boolean DEFAULT false NOT NULL,
	"passcode_status" "passcode_status" NOT NULL,
	"consent_to_open" boolean DEFAULT false NOT NULL,
	"consent_at" timestamp with time zone,
	"notes" text DEFAULT '' NOT NULL,
	"status" text DEFAULT 'received' NOT NULL,
	"technician_id" uuid,
	"created_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "jobs_identifier_check" CHECK ("jobs"."imei" is not null or "jobs"."serial" is not null),
	CONSTRAINT "jobs_imei_format_check" CHECK ("jobs"."imei" is null or "jobs"."imei" ~ '^[0-9]{15}$'),
	CONSTRAINT "jobs_status_check" CHECK (status in ('received', 'diagnosing', 'awaiting-approval', 'repairing', 'testing', 'ready', 'collected', 'cancelled')),
	CONSTRAINT "jobs_consent_check" CHECK (not "jobs"."consent_to_open" or "jobs"."consent_at" is not null)
);
--> statement-breakpoint
ALTER TABLE "job_events" ADD CONSTRAINT "job_events_job_id_jobs_id_fk" FOREIGN KEY ("job_id") REFERENCES "public"."jobs"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "job_events" ADD CONSTRAINT "job_events_by_users_id_fk" FOREIGN KEY ("by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "jobs" ADD CONSTRAINT "jobs_customer_id_customers_id_fk" FOREIGN KEY ("customer_id") REFERENCES "public"."customers"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "jobs" ADD CONSTRAINT "jobs_technician_id_users_id_fk" FOREIGN KEY ("technician_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "jobs" ADD CONSTRAINT "jobs_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "device_models_maker_model_idx" ON "device_models" USING btree (lower("maker"),lower("model"));--> statement-breakpoint
CREATE INDEX "job_events_job_idx" ON "job_events" USING btree ("job_id","at");--> statement-breakpoint
CREATE UNIQUE INDEX "jobs_number_idx" ON "jobs" USING btree ("number");--> statement-breakpoint
CREATE INDEX "jobs_status_idx" ON "jobs" USING btree ("status");--> statement-breakpoint
CREATE INDEX "jobs_technician_idx" ON "jobs" USING btree ("technician_id");--> statement-breakpoint
CREATE INDEX "jobs_created_at_idx" ON "jobs" USING btree ("created_at");--> statement-breakpoint
CREATE INDEX "jobs_imei_idx" ON "jobs" USING btree ("imei");