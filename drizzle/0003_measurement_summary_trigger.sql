-- Keeps fish_measurement_summary current: every write to a measurement (new, amended, entered in error)
-- recomputes that fish's latest weight, the latest weight-and-length pair with Fulton's K, and the weight-loss flag
-- (latest weight 10 % or more below the highest of the 90 days before it; common practice).
CREATE OR REPLACE FUNCTION fintrail_refresh_measurement_summary(target uuid) RETURNS void LANGUAGE plpgsql AS $$
DECLARE
  latest record;
  pair record;
  recent_max double precision;
BEGIN
  SELECT (e.data->>'weightG')::float8 AS weight_g, e.occurred_at INTO latest
  FROM timeline_entries e
  WHERE e.fish_id = target AND e.kind = 'measurement' AND NOT e.entered_in_error AND e.data ? 'weightG'
  ORDER BY e.occurred_at DESC, e.id DESC LIMIT 1;

  SELECT (e.data->>'weightG')::float8 AS weight_g, (e.data->>'lengthCm')::float8 AS length_cm INTO pair
  FROM timeline_entries e
  WHERE e.fish_id = target AND e.kind = 'measurement' AND NOT e.entered_in_error AND e.data ? 'weightG' AND e.data ? 'lengthCm'
  ORDER BY e.occurred_at DESC, e.id DESC LIMIT 1;

  IF latest.occurred_at IS NOT NULL THEN
    SELECT max((e.data->>'weightG')::float8) INTO recent_max
    FROM timeline_entries e
    WHERE e.fish_id = target AND e.kind = 'measurement' AND NOT e.entered_in_error AND e.data ? 'weightG'
      AND e.occurred_at BETWEEN latest.occurred_at - interval '90 days' AND latest.occurred_at;
  END IF;

  INSERT INTO fish_measurement_summary AS s (fish_id, weight_g, weighed_at, length_cm, condition_weight_g, condition_k, weight_alert, updated_at)
  VALUES (
    target, latest.weight_g, latest.occurred_at, pair.length_cm, pair.weight_g,
    CASE WHEN pair.length_cm > 0 THEN 100 * pair.weight_g / power(pair.length_cm, 3) END,
    coalesce(latest.weight_g < 0.9 * recent_max, false), now()
  )
  ON CONFLICT (fish_id) DO UPDATE SET weight_g = excluded.weight_g, weighed_at = excluded.weighed_at, length_cm = excluded.length_cm,
    condition_weight_g = excluded.condition_weight_g, condition_k = excluded.condition_k, weight_alert = excluded.weight_alert, updated_at = now();
END;
$$;
--> statement-breakpoint
CREATE OR REPLACE FUNCTION fintrail_measurement_changed() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  IF NEW.kind = 'measurement' OR (TG_OP = 'UPDATE' AND OLD.kind = 'measurement') THEN
    PERFORM fintrail_refresh_measurement_summary(NEW.fish_id);
    IF TG_OP = 'UPDATE' AND OLD.fish_id <> NEW.fish_id THEN
      PERFORM fintrail_refresh_measurement_summary(OLD.fish_id);
    END IF;
  END IF;
  RETURN NULL;
END;
$$;
--> statement-breakpoint
CREATE TRIGGER timeline_entries_measurement_summary AFTER INSERT OR UPDATE ON timeline_entries FOR EACH ROW EXECUTE FUNCTION fintrail_measurement_changed();
