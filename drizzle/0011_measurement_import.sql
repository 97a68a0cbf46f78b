CREATE TABLE "measurement_import_rows" (
	"import_key" varchar(64) PRIMARY KEY NOT NULL,
	"import_id" uuid NOT NULL,
	"entry_id" uuid NOT NULL,
	"row_number" integer NOT NULL
);
--> statement-breakpoint
CREATE TABLE "measurement_imports" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"pond_id" uuid NOT NULL,
	"imported_by_id" uuid NOT NULL,
	"file_name" varchar(255) NOT NULL,
	"file_sha256" varchar(64) NOT NULL,
	"mapping" jsonb NOT NULL,
	"row_count" integer NOT NULL,
	"imported_count" integer NOT NULL,
	"problem_count" integer NOT NULL,
	"skipped_count" integer NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "measurement_import_rows" ADD CONSTRAINT "measurement_import_rows_import_id_measurement_imports_id_fk" FOREIGN KEY ("import_id") REFERENCES "public"."measurement_imports"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "measurement_import_rows" ADD CONSTRAINT "measurement_import_rows_entry_id_timeline_entries_id_fk" FOREIGN KEY ("entry_id") REFERENCES "public"."timeline_entries"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "measurement_imports" ADD CONSTRAINT "measurement_imports_pond_id_ponds_id_fk" FOREIGN KEY ("pond_id") REFERENCES "public"."ponds"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "measurement_imports" ADD CONSTRAINT "measurement_imports_imported_by_id_users_id_fk" FOREIGN KEY ("imported_by_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "measurement_import_rows_import_idx" ON "measurement_import_rows" USING btree ("import_id");--> statement-breakpoint
CREATE INDEX "measurement_import_rows_entry_idx" ON "measurement_import_rows" USING btree ("entry_id");--> statement-breakpoint
CREATE INDEX "measurement_imports_pond_idx" ON "measurement_imports" USING btree ("pond_id","created_at");--> statement-breakpoint
CREATE INDEX "measurement_imports_imported_by_idx" ON "measurement_imports" USING btree ("imported_by_id");