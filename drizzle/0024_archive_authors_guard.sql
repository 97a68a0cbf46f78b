-- Entries read in from a pond archive name their author (and whoever marked them entered in error) as an
-- archive person, not a local account: the guard keeps either kind of author fixed for life and accepts
-- either kind of person on "entered in error".
CREATE OR REPLACE FUNCTION fintrail_timeline_entry_update_guard() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF NEW.id <> OLD.id OR NEW.fish_id <> OLD.fish_id OR NEW.pond_id <> OLD.pond_id OR NEW.kind <> OLD.kind
     OR NEW.author_id IS DISTINCT FROM OLD.author_id OR NEW.imported_author_id IS DISTINCT FROM OLD.imported_author_id
     OR NEW.created_at <> OLD.created_at THEN
    RAISE EXCEPTION 'timeline entry %: its fish, pond, kind and author never change', OLD.id
      USING ERRCODE = 'insufficient_privilege';
  END IF;

  IF OLD.entered_in_error AND (NOT NEW.entered_in_error OR NEW.error_reason IS DISTINCT FROM OLD.error_reason
     OR NEW.error_by_id IS DISTINCT FROM OLD.error_by_id OR NEW.imported_error_by_id IS DISTINCT FROM OLD.imported_error_by_id
     OR NEW.error_at IS DISTINCT FROM OLD.error_at) THEN
    RAISE EXCEPTION 'timeline entry %: "entered in error" is final', OLD.id
      USING ERRCODE = 'insufficient_privilege';
  END IF;

  IF NEW.entered_in_error AND NOT OLD.entered_in_error
     AND (coalesce(btrim(NEW.error_reason), '') = '' OR (NEW.error_by_id IS NULL AND NEW.imported_error_by_id IS NULL) OR NEW.error_at IS NULL) THEN
    RAISE EXCEPTION 'timeline entry %: marking it entered in error needs a reason, a person and a time', OLD.id
      USING ERRCODE = 'insufficient_privilege';
  END IF;

  IF (NEW.data, NEW.occurred_at, NEW.related_fish_id, NEW.linked_entry_id, NEW.photo_id, NEW.revision)
     IS DISTINCT FROM (OLD.data, OLD.occurred_at, OLD.related_fish_id, OLD.linked_entry_id, OLD.photo_id, OLD.revision) THEN
    IF OLD.entered_in_error THEN
      RAISE EXCEPTION 'timeline entry %: an entry entered in error is not amended', OLD.id
        USING ERRCODE = 'insufficient_privilege';
    END IF;
    IF NEW.revision <> OLD.revision + 1 THEN
      RAISE EXCEPTION 'timeline entry %: an amendment is revision %, not %', OLD.id, OLD.revision + 1, NEW.revision
        USING ERRCODE = 'insufficient_privilege';
    END IF;
    IF NOT EXISTS (
      SELECT 1 FROM timeline_revisions r
      WHERE r.entry_id = NEW.id AND r.revision = NEW.revision AND r.data = NEW.data AND r.occurred_at = NEW.occurred_at
    ) THEN
      RAISE EXCEPTION 'timeline entry %: write revision % with the same fields first', OLD.id, NEW.revision
        USING ERRCODE = 'insufficient_privilege';
    END IF;
  END IF;
  RETURN NEW;
END;
$$;
