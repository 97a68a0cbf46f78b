CREATE TABLE "water_tests" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"pond_id" uuid NOT NULL,
	"tested_at" timestamp with time zone NOT NULL,
	"tested_by_id" uuid NOT NULL,
	"temperature_c" numeric,
	"ph" numeric,
	"tan_mg_l" numeric,
	"nitrite_n_mg_l" numeric,
	"nitrate_n_mg_l" numeric,
	"kh_dkh" numeric,
	"gh_dgh" numeric,
	"dissolved_oxygen_mg_l" numeric,
	"salinity_ppt" numeric,
	"notes" text DEFAULT '' NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "ponds" ADD COLUMN "volume_measurement" jsonb;--> statement-breakpoint
ALTER TABLE "ponds" ADD COLUMN "water_targets" jsonb DEFAULT '{}'::jsonb NOT NULL;--> statement-breakpoint
ALTER TABLE "water_tests" ADD CONSTRAINT "water_tests_pond_id_ponds_id_fk" FOREIGN KEY ("pond_id") REFERENCES "public"."ponds"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "water_tests" ADD CONSTRAINT "water_tests_tested_by_id_users_id_fk" FOREIGN KEY ("tested_by_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "water_tests_pond_tested_idx" ON "water_tests" USING btree ("pond_id","tested_at" DESC NULLS LAST,"id" DESC NULLS LAST);--> statement-breakpoint
CREATE INDEX "water_tests_tested_by_idx" ON "water_tests" USING btree ("tested_by_id");