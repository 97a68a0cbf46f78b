ALTER TABLE "fish" ADD COLUMN "profile_focus_x" smallint;--> statement-breakpoint
ALTER TABLE "fish" ADD COLUMN "profile_focus_y" smallint;--> statement-breakpoint
ALTER TABLE "fish" ADD CONSTRAINT "fish_profile_focus_range" CHECK ("fish"."profile_focus_x" between 0 and 100 and "fish"."profile_focus_y" between 0 and 100);