CREATE TYPE "public"."clock_format" AS ENUM('24h', '12h');--> statement-breakpoint
ALTER TABLE "user_preferences" ADD COLUMN "clock" "clock_format" DEFAULT '24h' NOT NULL;