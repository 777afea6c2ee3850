ALTER TABLE "device_models" ADD COLUMN "capabilities" text[];--> statement-breakpoint
ALTER TABLE "jobs" ADD COLUMN "pre_repair_test" jsonb;