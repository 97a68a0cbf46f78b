CREATE TYPE "public"."outgoing_mail_status" AS ENUM('queued', 'sent', 'failed');--> statement-breakpoint
CREATE TABLE "outgoing_mail" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"to" varchar(254) NOT NULL,
	"subject" text NOT NULL,
	"text" text NOT NULL,
	"html" text,
	"kind" varchar(64) NOT NULL,
	"subject_type" varchar(64),
	"subject_id" uuid,
	"status" "outgoing_mail_status" DEFAULT 'queued' NOT NULL,
	"attempts" integer DEFAULT 0 NOT NULL,
	"last_error" text,
	"sent_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE INDEX "outgoing_mail_subject_idx" ON "outgoing_mail" USING btree ("subject_type","subject_id","created_at");--> statement-breakpoint
CREATE INDEX "outgoing_mail_status_idx" ON "outgoing_mail" USING btree ("status","created_at");