CREATE TABLE "treatment_doses" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"entry_id" uuid NOT NULL,
	"dose_number" integer NOT NULL,
	"given_at" timestamp with time zone NOT NULL,
	"given_by_id" uuid NOT NULL,
	"note" text DEFAULT '' NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "treatment_doses" ADD CONSTRAINT "treatment_doses_entry_id_timeline_entries_id_fk" FOREIGN KEY ("entry_id") REFERENCES "public"."timeline_entries"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "treatment_doses" ADD CONSTRAINT "treatment_doses_given_by_id_users_id_fk" FOREIGN KEY ("given_by_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "treatment_doses_entry_dose_unique" ON "treatment_doses" USING btree ("entry_id","dose_number");--> statement-breakpoint
CREATE INDEX "treatment_doses_given_by_idx" ON "treatment_doses" USING btree ("given_by_id");