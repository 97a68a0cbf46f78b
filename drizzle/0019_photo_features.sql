CREATE TABLE "photo_features" (
	"photo_id" uuid PRIMARY KEY NOT NULL,
	"version" integer NOT NULL,
	"features" "bytea" NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "photo_features" ADD CONSTRAINT "photo_features_photo_id_photos_id_fk" FOREIGN KEY ("photo_id") REFERENCES "public"."photos"("id") ON DELETE cascade ON UPDATE no action;