CREATE TYPE "public"."pond_event_kind" AS ENUM('salt', 'bath', 'water_change', 'mortality');--> statement-breakpoint
CREATE TYPE "public"."visit_purpose" AS ENUM('health_check', 'sick_call', 'surgery', 'follow_up');--> statement-breakpoint
CREATE TABLE "due_digests" (
	"user_id" uuid NOT NULL,
	"day" date NOT NULL,
	"sent_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "due_digests_user_id_day_pk" PRIMARY KEY("user_id","day")
);
--> statement-breakpoint
CREATE TABLE "pond_events" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"pond_id" uuid NOT NULL,
	"kind" "pond_event_kind" NOT NULL,
	"occurred_at" timestamp with time zone NOT NULL,
	"author_id" uuid NOT NULL,
	"visit_id" uuid,
	"volume_litres" numeric(12, 1),
	"data" jsonb NOT NULL,
	"entered_in_error" boolean DEFAULT false NOT NULL,
	"error_reason" text,
	"error_by_id" uuid,
	"error_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "visit_fish" (
	"visit_id" uuid NOT NULL,
	"fish_id" uuid NOT NULL,
	CONSTRAINT "visit_fish_visit_id_fish_id_pk" PRIMARY KEY("visit_id","fish_id")
);
--> statement-breakpoint
CREATE TABLE "visits" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"pond_id" uuid NOT NULL,
	"vet_id" uuid NOT NULL,
	"visited_on" date NOT NULL,
	"purpose" "visit_purpose" NOT NULL,
	"findings" text DEFAULT '' NOT NULL,
	"opened_at" timestamp with time zone DEFAULT now() NOT NULL,
	"closed_at" timestamp with time zone
);
--> statement-breakpoint
ALTER TABLE "users" ADD COLUMN "due_digest" boolean DEFAULT true NOT NULL;--> statement-breakpoint
ALTER TABLE "ponds" ADD COLUMN "health_check_day" varchar(5) DEFAULT '04-01' NOT NULL;--> statement-breakpoint
ALTER TABLE "ponds" ADD COLUMN "water_test_interval_days" integer DEFAULT 7 NOT NULL;--> statement-breakpoint
ALTER TABLE "timeline_entries" ADD COLUMN "visit_id" uuid;--> statement-breakpoint
ALTER TABLE "water_tests" ADD COLUMN "visit_id" uuid;--> statement-breakpoint
ALTER TABLE "due_digests" ADD CONSTRAINT "due_digests_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "pond_events" ADD CONSTRAINT "pond_events_pond_id_ponds_id_fk" FOREIGN KEY ("pond_id") REFERENCES "public"."ponds"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "pond_events" ADD CONSTRAINT "pond_events_author_id_users_id_fk" FOREIGN KEY ("author_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "pond_events" ADD CONSTRAINT "pond_events_visit_id_visits_id_fk" FOREIGN KEY ("visit_id") REFERENCES "public"."visits"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "pond_events" ADD CONSTRAINT "pond_events_error_by_id_users_id_fk" FOREIGN KEY ("error_by_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "visit_fish" ADD CONSTRAINT "visit_fish_visit_id_visits_id_fk" FOREIGN KEY ("visit_id") REFERENCES "public"."visits"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "visit_fish" ADD CONSTRAINT "visit_fish_fish_id_fish_id_fk" FOREIGN KEY ("fish_id") REFERENCES "public"."fish"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "visits" ADD CONSTRAINT "visits_pond_id_ponds_id_fk" FOREIGN KEY ("pond_id") REFERENCES "public"."ponds"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "visits" ADD CONSTRAINT "visits_vet_id_users_id_fk" FOREIGN KEY ("vet_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "pond_events_pond_occurred_idx" ON "pond_events" USING btree ("pond_id","occurred_at" DESC NULLS LAST,"id" DESC NULLS LAST);--> statement-breakpoint
CREATE INDEX "pond_events_author_idx" ON "pond_events" USING btree ("author_id");--> statement-breakpoint
CREATE INDEX "pond_events_visit_idx" ON "pond_events" USING btree ("visit_id");--> statement-breakpoint
CREATE INDEX "pond_events_error_by_idx" ON "pond_events" USING btree ("error_by_id");--> statement-breakpoint
CREATE INDEX "visit_fish_fish_idx" ON "visit_fish" USING btree ("fish_id");--> statement-breakpoint
CREATE INDEX "visits_pond_idx" ON "visits" USING btree ("pond_id","visited_on");--> statement-breakpoint
CREATE INDEX "visits_vet_idx" ON "visits" USING btree ("vet_id");--> statement-breakpoint
CREATE UNIQUE INDEX "visits_open_unique" ON "visits" USING btree ("pond_id","vet_id") WHERE "visits"."closed_at" is null;--> statement-breakpoint
ALTER TABLE "timeline_entries" ADD CONSTRAINT "timeline_entries_visit_id_visits_id_fk" FOREIGN KEY ("visit_id") REFERENCES "public"."visits"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "water_tests" ADD CONSTRAINT "water_tests_visit_id_visits_id_fk" FOREIGN KEY ("visit_id") REFERENCES "public"."visits"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "timeline_visit_idx" ON "timeline_entries" USING btree ("visit_id");--> statement-breakpoint
CREATE INDEX "water_tests_visit_idx" ON "water_tests" USING btree ("visit_id");