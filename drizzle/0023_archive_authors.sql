CREATE TABLE "archive_people" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"import_id" uuid NOT NULL,
	"name" text NOT NULL,
	"role" "pond_role",
	"email" text
);
--> statement-breakpoint
CREATE TABLE "pond_imports" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"pond_id" uuid NOT NULL,
	"imported_by_id" uuid NOT NULL,
	"exported_at" timestamp with time zone NOT NULL,
	"source_pond_name" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "fish_edits" ALTER COLUMN "user_id" DROP NOT NULL;--> statement-breakpoint
ALTER TABLE "photos" ALTER COLUMN "uploader_id" DROP NOT NULL;--> statement-breakpoint
ALTER TABLE "timeline_entries" ALTER COLUMN "author_id" DROP NOT NULL;--> statement-breakpoint
ALTER TABLE "timeline_revisions" ALTER COLUMN "author_id" DROP NOT NULL;--> statement-breakpoint
ALTER TABLE "treatment_doses" ALTER COLUMN "given_by_id" DROP NOT NULL;--> statement-breakpoint
ALTER TABLE "fish_edits" ADD COLUMN "imported_author_id" uuid;--> statement-breakpoint
ALTER TABLE "photos" ADD COLUMN "imported_uploader_id" uuid;--> statement-breakpoint
ALTER TABLE "timeline_entries" ADD COLUMN "imported_author_id" uuid;--> statement-breakpoint
ALTER TABLE "timeline_entries" ADD COLUMN "imported_error_by_id" uuid;--> statement-breakpoint
ALTER TABLE "timeline_revisions" ADD COLUMN "imported_author_id" uuid;--> statement-breakpoint
ALTER TABLE "treatment_doses" ADD COLUMN "imported_given_by_id" uuid;--> statement-breakpoint
ALTER TABLE "archive_people" ADD CONSTRAINT "archive_people_import_id_pond_imports_id_fk" FOREIGN KEY ("import_id") REFERENCES "public"."pond_imports"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "pond_imports" ADD CONSTRAINT "pond_imports_pond_id_ponds_id_fk" FOREIGN KEY ("pond_id") REFERENCES "public"."ponds"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "pond_imports" ADD CONSTRAINT "pond_imports_imported_by_id_users_id_fk" FOREIGN KEY ("imported_by_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "archive_people_import_idx" ON "archive_people" USING btree ("import_id");--> statement-breakpoint
CREATE INDEX "pond_imports_pond_idx" ON "pond_imports" USING btree ("pond_id");--> statement-breakpoint
CREATE INDEX "pond_imports_imported_by_idx" ON "pond_imports" USING btree ("imported_by_id");--> statement-breakpoint
ALTER TABLE "fish_edits" ADD CONSTRAINT "fish_edits_imported_author_id_archive_people_id_fk" FOREIGN KEY ("imported_author_id") REFERENCES "public"."archive_people"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "photos" ADD CONSTRAINT "photos_imported_uploader_id_archive_people_id_fk" FOREIGN KEY ("imported_uploader_id") REFERENCES "public"."archive_people"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "timeline_entries" ADD CONSTRAINT "timeline_entries_imported_author_id_archive_people_id_fk" FOREIGN KEY ("imported_author_id") REFERENCES "public"."archive_people"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "timeline_entries" ADD CONSTRAINT "timeline_entries_imported_error_by_id_archive_people_id_fk" FOREIGN KEY ("imported_error_by_id") REFERENCES "public"."archive_people"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "timeline_revisions" ADD CONSTRAINT "timeline_revisions_imported_author_id_archive_people_id_fk" FOREIGN KEY ("imported_author_id") REFERENCES "public"."archive_people"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "treatment_doses" ADD CONSTRAINT "treatment_doses_imported_given_by_id_archive_people_id_fk" FOREIGN KEY ("imported_given_by_id") REFERENCES "public"."archive_people"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "fish_edits_imported_author_idx" ON "fish_edits" USING btree ("imported_author_id");--> statement-breakpoint
CREATE INDEX "photos_imported_uploader_idx" ON "photos" USING btree ("imported_uploader_id");--> statement-breakpoint
CREATE INDEX "timeline_imported_author_idx" ON "timeline_entries" USING btree ("imported_author_id");--> statement-breakpoint
CREATE INDEX "timeline_imported_error_by_idx" ON "timeline_entries" USING btree ("imported_error_by_id");--> statement-breakpoint
CREATE INDEX "timeline_revisions_imported_author_idx" ON "timeline_revisions" USING btree ("imported_author_id");--> statement-breakpoint
CREATE INDEX "treatment_doses_imported_given_by_idx" ON "treatment_doses" USING btree ("imported_given_by_id");--> statement-breakpoint
ALTER TABLE "fish_edits" ADD CONSTRAINT "fish_edits_one_author" CHECK (num_nonnulls("fish_edits"."user_id", "fish_edits"."imported_author_id") = 1);--> statement-breakpoint
ALTER TABLE "photos" ADD CONSTRAINT "photos_one_uploader" CHECK (num_nonnulls("photos"."uploader_id", "photos"."imported_uploader_id") = 1);--> statement-breakpoint
ALTER TABLE "timeline_entries" ADD CONSTRAINT "timeline_entries_one_author" CHECK (num_nonnulls("timeline_entries"."author_id", "timeline_entries"."imported_author_id") = 1);--> statement-breakpoint
ALTER TABLE "timeline_revisions" ADD CONSTRAINT "timeline_revisions_one_author" CHECK (num_nonnulls("timeline_revisions"."author_id", "timeline_revisions"."imported_author_id") = 1);--> statement-breakpoint
ALTER TABLE "treatment_doses" ADD CONSTRAINT "treatment_doses_one_giver" CHECK (num_nonnulls("treatment_doses"."given_by_id", "treatment_doses"."imported_given_by_id") = 1);