CREATE TABLE "user_seen" (
	"user_id" uuid NOT NULL,
	"list" text NOT NULL,
	"seen_at" timestamp with time zone NOT NULL,
	CONSTRAINT "user_seen_user_id_list_pk" PRIMARY KEY("user_id","list")
);
--> statement-breakpoint
ALTER TABLE "jobs" ADD COLUMN "promised_at" timestamp with time zone;--> statement-breakpoint
ALTER TABLE "user_seen" ADD CONSTRAINT "user_seen_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "jobs_promised_at_idx" ON "jobs" USING btree ("promised_at");