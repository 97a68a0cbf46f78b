CREATE TABLE "fish_transfers" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"fish_id" uuid NOT NULL,
	"from_pond_id" uuid NOT NULL,
	"from_user_id" uuid NOT NULL,
	"to_email" varchar(254) NOT NULL,
	"token_hash" varchar(64) NOT NULL,
	"confirmed_separation" boolean DEFAULT false NOT NULL,
	"expires_at" timestamp with time zone NOT NULL,
	"accepted_at" timestamp with time zone,
	"accepted_by_id" uuid,
	"to_pond_id" uuid,
	"withdrawn_at" timestamp with time zone,
	"superseded_reason" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "fish_transfers_token_hash_unique" UNIQUE("token_hash")
);
--> statement-breakpoint
ALTER TABLE "fish_transfers" ADD CONSTRAINT "fish_transfers_fish_id_fish_id_fk" FOREIGN KEY ("fish_id") REFERENCES "public"."fish"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "fish_transfers" ADD CONSTRAINT "fish_transfers_from_pond_id_ponds_id_fk" FOREIGN KEY ("from_pond_id") REFERENCES "public"."ponds"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "fish_transfers" ADD CONSTRAINT "fish_transfers_from_user_id_users_id_fk" FOREIGN KEY ("from_user_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "fish_transfers" ADD CONSTRAINT "fish_transfers_accepted_by_id_users_id_fk" FOREIGN KEY ("accepted_by_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "fish_transfers" ADD CONSTRAINT "fish_transfers_to_pond_id_ponds_id_fk" FOREIGN KEY ("to_pond_id") REFERENCES "public"."ponds"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "fish_transfers_fish_idx" ON "fish_transfers" USING btree ("fish_id");--> statement-breakpoint
CREATE INDEX "fish_transfers_from_pond_idx" ON "fish_transfers" USING btree ("from_pond_id");--> statement-breakpoint
CREATE INDEX "fish_transfers_from_user_idx" ON "fish_transfers" USING btree ("from_user_id");--> statement-breakpoint
CREATE INDEX "fish_transfers_accepted_by_idx" ON "fish_transfers" USING btree ("accepted_by_id");--> statement-breakpoint
CREATE INDEX "fish_transfers_to_pond_idx" ON "fish_transfers" USING btree ("to_pond_id");