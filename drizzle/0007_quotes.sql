CREATE TABLE "quotes" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"job_id" uuid NOT NULL,
	"version" integer NOT NULL,
	"status" text DEFAULT 'draft' NOT NULL,
	"lines" jsonb NOT NULL,
	"proposal" text DEFAULT '' NOT NULL,
	"currency" text NOT NULL,
	"tax_rate_basis_points" integer NOT NULL,
	"prices_include_tax" boolean NOT NULL,
	"net_minor" integer NOT NULL,
	"tax_minor" integer NOT NULL,
	"gross_minor" integer NOT NULL,
	"paid_minor" integer DEFAULT 0 NOT NULL,
	"paid_at" timestamp with time zone,
	"sent_at" timestamp with time zone,
	"approved_name" text,
	"approved_at" timestamp with time zone,
	"declined_name" text,
	"declined_at" timestamp with time zone,
	"created_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "quotes_status_check" CHECK ("quotes"."status" in ('draft', 'sent', 'approved', 'declined', 'superseded')),
	CONSTRAINT "quotes_amounts_check" CHECK ("quotes"."net_minor" >= 0 and "quotes"."tax_minor" >= 0 and "quotes"."gross_minor" >= 0 and "quotes"."paid_minor" >= 0),
	CONSTRAINT "quotes_currency_check" CHECK ("quotes"."currency" ~ '^[A-Z]{3}$'),
	CONSTRAINT "quotes_approved_check" CHECK (("quotes"."status" = 'approved') = ("quotes"."approved_at" is not null))
);
--> statement-breakpoint
CREATE TABLE "report_links" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"job_id" uuid NOT NULL,
	"token_hash" text NOT NULL,
	"expires_at" timestamp with time zone NOT NULL,
	"revoked_at" timestamp with time zone,
	"revoked_by" uuid,
	"created_by" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"last_opened_at" timestamp with time zone,
	CONSTRAINT "report_links_hash_check" CHECK ("report_links"."token_hash" ~ '^[0-9a-f]{64}$')
);
--> statement-breakpoint
ALTER TABLE "quotes" ADD CONSTRAINT "quotes_job_id_jobs_id_fk" FOREIGN KEY ("job_id") REFERENCES "public"."jobs"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "quotes" ADD CONSTRAINT "quotes_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "report_links" ADD CONSTRAINT "report_links_job_id_jobs_id_fk" FOREIGN KEY ("job_id") REFERENCES "public"."jobs"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "report_links" ADD CONSTRAINT "report_links_revoked_by_users_id_fk" FOREIGN KEY ("revoked_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "report_links" ADD CONSTRAINT "report_links_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "quotes_job_version_idx" ON "quotes" USING btree ("job_id","version");--> statement-breakpoint
CREATE UNIQUE INDEX "report_links_token_hash_idx" ON "report_links" USING btree ("token_hash");--> statement-breakpoint
CREATE INDEX "report_links_job_idx" ON "report_links" USING btree ("job_id","created_at");