CREATE TYPE "public"."handover_members_option" AS ENUM('stay', 'read_only', 'leave');--> statement-breakpoint
CREATE TABLE "pond_handovers" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"pond_id" uuid NOT NULL,
	"from_user_id" uuid NOT NULL,
	"to_email" varchar(254) NOT NULL,
	"members_option" "handover_members_option" NOT NULL,
	"token_hash" varchar(64) NOT NULL,
	"expires_at" timestamp with time zone NOT NULL,
	"accepted_at" timestamp with time zone,
	"accepted_by_id" uuid,
	"withdrawn_at" timestamp with time zone,
	"superseded_by_id" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "pond_handovers_token_hash_unique" UNIQUE("token_hash")
);
--> statement-breakpoint
ALTER TABLE "memberships" ADD COLUMN "read_only" boolean DEFAULT false NOT NULL;--> statement-breakpoint
ALTER TABLE "pond_handovers" ADD CONSTRAINT "pond_handovers_pond_id_ponds_id_fk" FOREIGN KEY ("pond_id") REFERENCES "public"."ponds"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "pond_handovers" ADD CONSTRAINT "pond_handovers_from_user_id_users_id_fk" FOREIGN KEY ("from_user_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "pond_handovers" ADD CONSTRAINT "pond_handovers_accepted_by_id_users_id_fk" FOREIGN KEY ("accepted_by_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "pond_handovers_pond_idx" ON "pond_handovers" USING btree ("pond_id");--> statement-breakpoint
CREATE INDEX "pond_handovers_from_user_idx" ON "pond_handovers" USING btree ("from_user_id");--> statement-breakpoint
CREATE INDEX "pond_handovers_accepted_by_idx" ON "pond_handovers" USING btree ("accepted_by_id");--> statement-breakpoint
CREATE INDEX "pond_handovers_superseded_by_idx" ON "pond_handovers" USING btree ("superseded_by_id");