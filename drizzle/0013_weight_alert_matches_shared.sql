-- The fish table's weight-loss flag follows the loss rule of shared/utils/condition.ts (weightChangeAlert) to
-- the boundary: the latest weight is 10 % or more below a weighing of the 90 days (exactly 2160 hours, whatever
-- the session's time zone) before it, computed as the same percentage with the same tolerance. The ORDER BYs say
-- NULLS LAST so they match timeline_fish_kind_occurred_idx and read one index entry instead of sorting the fish's history.
CREATE OR REPLACE FUNCTION fintrail_refresh_measurement_summary(target uuid) RETURNS void LANGUAGE plpgsql AS $$
DECLARE
  latest record;
  pair record;
  recent_max double precision;
BEGIN
  SELECT (e.data->>'weightG')::float8 AS weight_g, e.occurred_at INTO latest
  FROM timeline_entries e
  WHERE e.fish_id = target AND e.kind = 'measurement' AND NOT e.entered_in_error AND e.data ? 'weightG'
  ORDER BY e.occurred_at DESC NULLS LAST, e.id DESC NULLS LAST LIMIT 1;

  SELECT (e.data->>'weightG')::float8 AS weight_g, (e.data->>'lengthCm')::float8 AS length_cm INTO pair
  FROM timeline_entries e
  WHERE e.fish_id = target AND e.kind = 'measurement' AND NOT e.entered_in_error AND e.data ? 'weightG' AND e.data ? 'lengthCm'
  ORDER BY e.occurred_at DESC NULLS LAST, e.id DESC NULLS LAST LIMIT 1;

  IF latest.occurred_at IS NOT NULL THEN
    SELECT max((e.data->>'weightG')::float8) INTO recent_max
    FROM timeline_entries e
    WHERE e.fish_id = target AND e.kind = 'measurement' AND NOT e.entered_in_error AND e.data ? 'weightG'
      AND e.occurred_at >= latest.occurred_at - interval '2160 hours' AND e.occurred_at < latest.occurred_at;
  END IF;

  INSERT INTO fish_measurement_summary AS s (fish_id, weight_g, weighed_at, length_cm, condition_weight_g, condition_k, weight_alert, updated_at)
  VALUES (
    target, latest.weight_g, latest.occurred_at, pair.length_cm, pair.weight_g,
    CASE WHEN pair.length_cm > 0 THEN 100 * pair.weight_g / power(pair.length_cm, 3) END,
    coalesce(recent_max > 0 AND 100 * (latest.weight_g - recent_max) / recent_max <= -10 + 1e-9, false), now()
  )
  ON CONFLICT (fish_id) DO UPDATE SET weight_g = excluded.weight_g, weighed_at = excluded.weighed_at, length_cm = excluded.length_cm,
    condition_weight_g = excluded.condition_weight_g, condition_k = excluded.condition_k, weight_alert = excluded.weight_alert, updated_at = now();
END;
$$;
--> statement-breakpoint
-- Summaries written under the old rule are recomputed once.
SELECT fintrail_refresh_measurement_summary(fish_id) FROM fish_measurement_summary;
