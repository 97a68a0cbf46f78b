-- A bulk write (an archive import) sets fintrail.bulk_measurements = 'on' for its transaction and refreshes each
-- fish's summary once at the end: refreshing per row would update one summary row thousands of times in a single
-- transaction, and every update must step over the dead versions the earlier ones left.
CREATE OR REPLACE FUNCTION fintrail_measurement_changed() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF coalesce(current_setting('fintrail.bulk_measurements', true), '') = 'on' THEN
    RETURN NULL;
  END IF;
  IF NEW.kind = 'measurement' OR (TG_OP = 'UPDATE' AND OLD.kind = 'measurement') THEN
    PERFORM fintrail_refresh_measurement_summary(NEW.fish_id);
    IF TG_OP = 'UPDATE' AND OLD.fish_id <> NEW.fish_id THEN
      PERFORM fintrail_refresh_measurement_summary(OLD.fish_id);
    END IF;
  END IF;
  RETURN NULL;
END;
$$;
