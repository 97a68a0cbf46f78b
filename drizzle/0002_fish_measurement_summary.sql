CREATE TABLE "fish_measurement_summary" (
	"fish_id" uuid PRIMARY KEY NOT NULL,
	"weight_g" double precision,
	"weighed_at" timestamp with time zone,
	"length_cm" double precision,
	"condition_weight_g" double precision,
	"condition_k" double precision,
	"weight_alert" boolean DEFAULT false NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "fish_measurement_summary" ADD CONSTRAINT "fish_measurement_summary_fish_id_fish_id_fk" FOREIGN KEY ("fish_id") REFERENCES "public"."fish"("id") ON DELETE no action ON UPDATE no action;