CREATE TYPE "public"."liquid_temperature" AS ENUM('room', 'warm', 'hot');--> statement-breakpoint
CREATE TYPE "public"."water_motion" AS ENUM('still', 'moving', 'jet');--> statement-breakpoint
ALTER TABLE "jobs" ADD COLUMN "liquid_temperature" "liquid_temperature";--> statement-breakpoint
ALTER TABLE "jobs" ADD COLUMN "water_motion" "water_motion";--> statement-breakpoint
ALTER TABLE "jobs" ADD COLUMN "soapy" boolean;