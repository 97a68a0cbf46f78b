CREATE TYPE "public"."unit_system" AS ENUM('metric', 'us');--> statement-breakpoint
CREATE TYPE "public"."pond_role" AS ENUM('owner', 'keeper', 'vet');--> statement-breakpoint
CREATE TYPE "public"."fish_sex" AS ENUM('unknown', 'male', 'female');--> statement-breakpoint
CREATE TYPE "public"."fish_species" AS ENUM('koi', 'goldfish', 'other');--> statement-breakpoint
CREATE TYPE "public"."fish_status" AS ENUM('alive', 'deceased', 'rehomed');--> statement-breakpoint
CREATE TYPE "public"."photo_state" AS ENUM('pending', 'ready', 'failed');--> statement-breakpoint
CREATE TYPE "public"."photo_view" AS ENUM('top', 'left', 'right', 'closeup', 'other');--> statement-breakpoint
CREATE TYPE "public"."timeline_kind" AS ENUM('measurement', 'observation', 'exam', 'problem', 'procedure', 'anaesthesia', 'treatment', 'lab_result', 'companion', 'death', 'photo', 'move', 'owner_change');--> statement-breakpoint
CREATE TABLE "password_resets" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"user_id" uuid NOT NULL,
	"token_hash" varchar(64) NOT NULL,
	"expires_at" timestamp with time zone NOT NULL,
	"used_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "password_resets_token_hash_unique" UNIQUE("token_hash")
);
--> statement-breakpoint
CREATE TABLE "sessions" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"user_id" uuid NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"last_seen_at" timestamp with time zone DEFAULT now() NOT NULL,
	"revoked_at" timestamp with time zone,
	"user_agent" varchar(300)
);
--> statement-breakpoint
CREATE TABLE "sign_in_failures" (
	"id" integer PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "sign_in_failures_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 2147483647 START WITH 1 CACHE 1),
	"key" varchar(300) NOT NULL,
	"at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "users" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"email" varchar(254) NOT NULL,
	"name" varchar(120) NOT NULL,
	"password_hash" text NOT NULL,
	"units" "unit_system" DEFAULT 'metric' NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "invitations" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"pond_id" uuid NOT NULL,
	"email" varchar(254) NOT NULL,
	"role" "pond_role" NOT NULL,
	"token_hash" varchar(64) NOT NULL,
	"invited_by_id" uuid NOT NULL,
	"expires_at" timestamp with time zone NOT NULL,
	"accepted_at" timestamp with time zone,
	"accepted_by_id" uuid,
	"withdrawn_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "invitations_token_hash_unique" UNIQUE("token_hash")
);
--> statement-breakpoint
CREATE TABLE "memberships" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"pond_id" uuid NOT NULL,
	"user_id" uuid NOT NULL,
	"role" "pond_role" NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "ponds" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"name" varchar(120) NOT NULL,
	"volume_litres" numeric(12, 1),
	"notes" text DEFAULT '' NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "fish" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"pond_id" uuid NOT NULL,
	"name" varchar(80) NOT NULL,
	"species" "fish_species" NOT NULL,
	"scientific_name" varchar(120) NOT NULL,
	"variety" varchar(80) DEFAULT '' NOT NULL,
	"sex" "fish_sex" DEFAULT 'unknown' NOT NULL,
	"hatch_year" integer,
	"hatch_year_estimated" boolean DEFAULT false NOT NULL,
	"acquired_on" date,
	"acquired_from" varchar(160) DEFAULT '' NOT NULL,
	"microchip" varchar(15),
	"features" text DEFAULT '' NOT NULL,
	"status" "fish_status" DEFAULT 'alive' NOT NULL,
	"profile_photo_id" uuid,
	"version" integer DEFAULT 1 NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "fish_edits" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"fish_id" uuid NOT NULL,
	"user_id" uuid NOT NULL,
	"changes" jsonb NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "photos" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"fish_id" uuid NOT NULL,
	"uploader_id" uuid NOT NULL,
	"upload_id" varchar(80) NOT NULL,
	"original_name" varchar(255) DEFAULT '' NOT NULL,
	"view" "photo_view" DEFAULT 'other' NOT NULL,
	"caption" varchar(300) DEFAULT '' NOT NULL,
	"taken_at" timestamp with time zone,
	"state" "photo_state" DEFAULT 'pending' NOT NULL,
	"failure_reason" text,
	"mime" varchar(40),
	"width" integer,
	"height" integer,
	"bytes" integer,
	"sha256" varchar(64),
	"variants" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"removed_at" timestamp with time zone,
	"removed_by_id" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "photos_upload_id_unique" UNIQUE("upload_id")
);
--> statement-breakpoint
CREATE TABLE "timeline_entries" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"fish_id" uuid NOT NULL,
	"pond_id" uuid NOT NULL,
	"kind" timeline_kind NOT NULL,
	"occurred_at" timestamp with time zone NOT NULL,
	"author_id" uuid NOT NULL,
	"related_fish_id" uuid,
	"linked_entry_id" uuid,
	"photo_id" uuid,
	"data" jsonb NOT NULL,
	"revision" integer DEFAULT 1 NOT NULL,
	"entered_in_error" boolean DEFAULT false NOT NULL,
	"error_reason" text,
	"error_by_id" uuid,
	"error_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "timeline_revisions" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"entry_id" uuid NOT NULL,
	"revision" integer NOT NULL,
	"occurred_at" timestamp with time zone NOT NULL,
	"data" jsonb NOT NULL,
	"author_id" uuid NOT NULL,
	"reason" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "password_resets" ADD CONSTRAINT "password_resets_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "sessions" ADD CONSTRAINT "sessions_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "invitations" ADD CONSTRAINT "invitations_pond_id_ponds_id_fk" FOREIGN KEY ("pond_id") REFERENCES "public"."ponds"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "invitations" ADD CONSTRAINT "invitations_invited_by_id_users_id_fk" FOREIGN KEY ("invited_by_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "invitations" ADD CONSTRAINT "invitations_accepted_by_id_users_id_fk" FOREIGN KEY ("accepted_by_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "memberships" ADD CONSTRAINT "memberships_pond_id_ponds_id_fk" FOREIGN KEY ("pond_id") REFERENCES "public"."ponds"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "memberships" ADD CONSTRAINT "memberships_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "fish" ADD CONSTRAINT "fish_pond_id_ponds_id_fk" FOREIGN KEY ("pond_id") REFERENCES "public"."ponds"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "fish_edits" ADD CONSTRAINT "fish_edits_fish_id_fish_id_fk" FOREIGN KEY ("fish_id") REFERENCES "public"."fish"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "fish_edits" ADD CONSTRAINT "fish_edits_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "photos" ADD CONSTRAINT "photos_fish_id_fish_id_fk" FOREIGN KEY ("fish_id") REFERENCES "public"."fish"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "photos" ADD CONSTRAINT "photos_uploader_id_users_id_fk" FOREIGN KEY ("uploader_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "photos" ADD CONSTRAINT "photos_removed_by_id_users_id_fk" FOREIGN KEY ("removed_by_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "timeline_entries" ADD CONSTRAINT "timeline_entries_fish_id_fish_id_fk" FOREIGN KEY ("fish_id") REFERENCES "public"."fish"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "timeline_entries" ADD CONSTRAINT "timeline_entries_pond_id_ponds_id_fk" FOREIGN KEY ("pond_id") REFERENCES "public"."ponds"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "timeline_entries" ADD CONSTRAINT "timeline_entries_author_id_users_id_fk" FOREIGN KEY ("author_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "timeline_entries" ADD CONSTRAINT "timeline_entries_related_fish_id_fish_id_fk" FOREIGN KEY ("related_fish_id") REFERENCES "public"."fish"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "timeline_entries" ADD CONSTRAINT "timeline_entries_photo_id_photos_id_fk" FOREIGN KEY ("photo_id") REFERENCES "public"."photos"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "timeline_entries" ADD CONSTRAINT "timeline_entries_error_by_id_users_id_fk" FOREIGN KEY ("error_by_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "timeline_revisions" ADD CONSTRAINT "timeline_revisions_entry_id_timeline_entries_id_fk" FOREIGN KEY ("entry_id") REFERENCES "public"."timeline_entries"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "timeline_revisions" ADD CONSTRAINT "timeline_revisions_author_id_users_id_fk" FOREIGN KEY ("author_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "password_resets_user_idx" ON "password_resets" USING btree ("user_id");--> statement-breakpoint
CREATE INDEX "sessions_user_idx" ON "sessions" USING btree ("user_id");--> statement-breakpoint
CREATE INDEX "sign_in_failures_key_at_idx" ON "sign_in_failures" USING btree ("key","at");--> statement-breakpoint
CREATE UNIQUE INDEX "users_email_unique" ON "users" USING btree (lower("email"));--> statement-breakpoint
CREATE INDEX "invitations_pond_idx" ON "invitations" USING btree ("pond_id");--> statement-breakpoint
CREATE INDEX "invitations_invited_by_idx" ON "invitations" USING btree ("invited_by_id");--> statement-breakpoint
CREATE INDEX "invitations_accepted_by_idx" ON "invitations" USING btree ("accepted_by_id");--> statement-breakpoint
CREATE UNIQUE INDEX "memberships_pond_user_unique" ON "memberships" USING btree ("pond_id","user_id");--> statement-breakpoint
CREATE INDEX "memberships_user_idx" ON "memberships" USING btree ("user_id");--> statement-breakpoint
CREATE INDEX "fish_pond_idx" ON "fish" USING btree ("pond_id");--> statement-breakpoint
CREATE INDEX "fish_pond_name_idx" ON "fish" USING btree ("pond_id","name");--> statement-breakpoint
CREATE UNIQUE INDEX "fish_microchip_alive_unique" ON "fish" USING btree ("microchip") WHERE "fish"."status" = 'alive' and "fish"."microchip" is not null;--> statement-breakpoint
CREATE INDEX "fish_edits_fish_idx" ON "fish_edits" USING btree ("fish_id","created_at");--> statement-breakpoint
CREATE INDEX "fish_edits_user_idx" ON "fish_edits" USING btree ("user_id");--> statement-breakpoint
CREATE INDEX "photos_fish_idx" ON "photos" USING btree ("fish_id","created_at");--> statement-breakpoint
CREATE INDEX "photos_uploader_idx" ON "photos" USING btree ("uploader_id");--> statement-breakpoint
CREATE INDEX "photos_removed_by_idx" ON "photos" USING btree ("removed_by_id");--> statement-breakpoint
CREATE INDEX "timeline_fish_occurred_idx" ON "timeline_entries" USING btree ("fish_id","occurred_at" DESC NULLS LAST,"id" DESC NULLS LAST);--> statement-breakpoint
CREATE INDEX "timeline_fish_kind_occurred_idx" ON "timeline_entries" USING btree ("fish_id","kind","occurred_at" DESC NULLS LAST);--> statement-breakpoint
CREATE INDEX "timeline_pond_idx" ON "timeline_entries" USING btree ("pond_id");--> statement-breakpoint
CREATE INDEX "timeline_author_idx" ON "timeline_entries" USING btree ("author_id");--> statement-breakpoint
CREATE INDEX "timeline_related_fish_idx" ON "timeline_entries" USING btree ("related_fish_id");--> statement-breakpoint
CREATE INDEX "timeline_linked_entry_idx" ON "timeline_entries" USING btree ("linked_entry_id");--> statement-breakpoint
CREATE INDEX "timeline_photo_idx" ON "timeline_entries" USING btree ("photo_id");--> statement-breakpoint
CREATE INDEX "timeline_error_by_idx" ON "timeline_entries" USING btree ("error_by_id");--> statement-breakpoint
CREATE UNIQUE INDEX "timeline_revisions_entry_revision_unique" ON "timeline_revisions" USING btree ("entry_id","revision");--> statement-breakpoint
CREATE INDEX "timeline_revisions_author_idx" ON "timeline_revisions" USING btree ("author_id");