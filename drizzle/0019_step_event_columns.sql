-- A run keeps the number of its newest step; the body hash of each event's idempotency key moves
-- from request_keys onto the step it wrote (src/lib/server/runs/commit.ts).
ALTER TABLE "runs" ADD COLUMN "last_seq" integer DEFAULT 0 NOT NULL;--> statement-breakpoint
UPDATE "runs" r SET "last_seq" = s."n" FROM (SELECT "run_id", max("seq") AS "n" FROM "run_steps" GROUP BY "run_id") s
	WHERE s."run_id" = r."id";--> statement-breakpoint
ALTER TABLE "run_steps" ADD COLUMN "body_hash" text;--> statement-breakpoint
UPDATE "run_steps" rs SET "body_hash" = rk."body_hash" FROM "request_keys" rk
	WHERE rk."scope" = 'run-event:' || rs."run_id"::text AND rk."key" = rs."idempotency_key";--> statement-breakpoint
DROP TABLE "request_keys" CASCADE;
