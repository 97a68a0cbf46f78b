-- The lifelong record never loses a row: deleting or truncating timeline rows fails for every role,
-- and a written revision can never be changed.
CREATE OR REPLACE FUNCTION fintrail_refuse_change() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  RAISE EXCEPTION 'timeline records are append-only: % on % is not allowed', TG_OP, TG_TABLE_NAME
    USING ERRCODE = 'insufficient_privilege';
END;
$$;
--> statement-breakpoint
CREATE TRIGGER timeline_entries_no_delete BEFORE DELETE ON timeline_entries FOR EACH ROW EXECUTE FUNCTION fintrail_refuse_change();
--> statement-breakpoint
CREATE TRIGGER timeline_entries_no_truncate BEFORE TRUNCATE ON timeline_entries FOR EACH STATEMENT EXECUTE FUNCTION fintrail_refuse_change();
--> statement-breakpoint
CREATE TRIGGER timeline_revisions_no_change BEFORE UPDATE OR DELETE ON timeline_revisions FOR EACH ROW EXECUTE FUNCTION fintrail_refuse_change();
--> statement-breakpoint
CREATE TRIGGER timeline_revisions_no_truncate BEFORE TRUNCATE ON timeline_revisions FOR EACH STATEMENT EXECUTE FUNCTION fintrail_refuse_change();
