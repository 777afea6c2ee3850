CREATE TABLE "flow_versions" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"flow_id" text NOT NULL,
	"version" integer,
	"status" text DEFAULT 'draft' NOT NULL,
	"definition" jsonb NOT NULL,
	"step_order" text[] NOT NULL,
	"checksum" text NOT NULL,
	"author_id" uuid,
	"reviewer_id" uuid,
	"based_on_id" uuid,
	"changelog" text,
	"review_comment" text,
	"revision" integer DEFAULT 1 NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	"submitted_at" timestamp with time zone,
	"published_at" timestamp with time zone,
	"retired_at" timestamp with time zone,
	CONSTRAINT "flow_versions_flow_version_uq" UNIQUE("flow_id","version"),
	CONSTRAINT "flow_versions_status_check" CHECK ("flow_versions"."status" in ('draft', 'in-review', 'published', 'retired')),
	CONSTRAINT "flow_versions_version_check" CHECK (("flow_versions"."status" in ('published', 'retired')) = ("flow_versions"."version" is not null))
);
--> statement-breakpoint
CREATE TABLE "flows" (
	"id" text PRIMARY KEY NOT NULL,
	"title" text NOT NULL,
	"symptoms" text[] DEFAULT '{}'::text[] NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "flow_versions" ADD CONSTRAINT "flow_versions_flow_id_flows_id_fk" FOREIGN KEY ("flow_id") REFERENCES "public"."flows"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "flow_versions" ADD CONSTRAINT "flow_versions_author_id_users_id_fk" FOREIGN KEY ("author_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "flow_versions" ADD CONSTRAINT "flow_versions_reviewer_id_users_id_fk" FOREIGN KEY ("reviewer_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "flow_versions" ADD CONSTRAINT "flow_versions_based_on_id_flow_versions_id_fk" FOREIGN KEY ("based_on_id") REFERENCES "public"."flow_versions"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "flow_versions_status_idx" ON "flow_versions" USING btree ("status");--> statement-breakpoint
CREATE INDEX "flow_versions_flow_idx" ON "flow_versions" USING btree ("flow_id");