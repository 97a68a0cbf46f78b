CREATE TYPE "public"."decimal_mark" AS ENUM('point', 'comma');--> statement-breakpoint
ALTER TABLE "users" ADD COLUMN "decimal_mark" decimal_mark DEFAULT 'point' NOT NULL;