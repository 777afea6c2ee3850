CREATE TABLE "symptoms" (
	"code" text PRIMARY KEY NOT NULL,
	"label" text NOT NULL,
	"group_name" text NOT NULL,
	"sort_order" integer DEFAULT 0 NOT NULL,
	"retired" boolean DEFAULT false NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "symptoms_code_check" CHECK ("symptoms"."code" ~ '^[a-z0-9]+(-[a-z0-9]+)*$')
);
--> statement-breakpoint
CREATE INDEX "symptoms_group_idx" ON "symptoms" USING btree ("group_name","sort_order");