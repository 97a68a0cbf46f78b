-- Which pond a fish lived in at a moment, read from the same facts as its residences
-- (GET /api/fish/:id/residences): it arrived on its acquired day (or the day it was registered),
-- each move entry ends one stay and starts the next, and a death ends the last. Null when the fish
-- was not yet there or no longer alive. Whole-pond events reach exactly the fish for which this
-- answers the event's pond at the event's time.
CREATE OR REPLACE FUNCTION fintrail_fish_pond_at(p_fish uuid, p_at timestamptz) RETURNS uuid
LANGUAGE sql STABLE AS $$
  SELECT CASE
    WHEN p_at < (coalesce(f.acquired_on, (f.created_at AT TIME ZONE 'UTC')::date)::timestamp AT TIME ZONE 'UTC') THEN NULL
    WHEN EXISTS (
      SELECT 1 FROM timeline_entries d
      WHERE d.fish_id = f.id AND d.kind = 'death' AND NOT d.entered_in_error AND d.occurred_at < p_at
    ) THEN NULL
    ELSE coalesce((
      SELECT (m.data->'fromPond'->>'id')::uuid FROM timeline_entries m
      WHERE m.fish_id = f.id AND m.kind = 'move' AND NOT m.entered_in_error AND m.occurred_at > p_at
      ORDER BY m.occurred_at, m.id LIMIT 1
    ), f.pond_id)
  END
  FROM fish f WHERE f.id = p_fish
$$;
--> statement-breakpoint
-- A whole-pond event is part of every resident fish's lifelong record: never deleted, and once
-- written only ever marked "entered in error" (with a reason, a person and a time), which is final.
CREATE OR REPLACE FUNCTION fintrail_pond_event_guard() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF TG_OP = 'DELETE' THEN
    RAISE EXCEPTION 'pond event %: never deleted', OLD.id USING ERRCODE = 'insufficient_privilege';
  END IF;
  IF (NEW.id, NEW.pond_id, NEW.kind, NEW.occurred_at, NEW.author_id, NEW.visit_id, NEW.volume_litres, NEW.data, NEW.created_at)
     IS DISTINCT FROM (OLD.id, OLD.pond_id, OLD.kind, OLD.occurred_at, OLD.author_id, OLD.visit_id, OLD.volume_litres, OLD.data, OLD.created_at)
     OR OLD.entered_in_error
     OR (NEW.entered_in_error AND (coalesce(btrim(NEW.error_reason), '') = '' OR NEW.error_by_id IS NULL OR NEW.error_at IS NULL)) THEN
    RAISE EXCEPTION 'pond event %: only marked entered in error, once, with a reason', OLD.id USING ERRCODE = 'insufficient_privilege';
  END IF;
  RETURN NEW;
END;
$$;
--> statement-breakpoint
CREATE TRIGGER pond_events_guard BEFORE UPDATE OR DELETE ON pond_events
  FOR EACH ROW EXECUTE FUNCTION fintrail_pond_event_guard();
--> statement-breakpoint
CREATE TRIGGER pond_events_no_truncate BEFORE TRUNCATE ON pond_events
  FOR EACH STATEMENT EXECUTE FUNCTION fintrail_refuse_change();
