CREATE TABLE "weight_loss_rule" (
	"id" boolean PRIMARY KEY DEFAULT true NOT NULL,
	"loss_percent" double precision NOT NULL,
	"loss_window_days" integer NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "weight_loss_rule_one_row" CHECK ("weight_loss_rule"."id")
);
--> statement-breakpoint
-- The weight-loss flag reads its thresholds from weight_loss_rule, the row scripts/migrate.ts writes from
-- WEIGHT_LOSS_RULE (shared/utils/condition.ts), instead of numbers of its own. The rule is otherwise that of
-- drizzle/0013: the latest weight is lossPercent or more below a weighing of the lossWindowDays (counted in
-- hours, whatever the session's time zone) before it, with the same tolerance as weightChangeAlert.
-- Summaries are recomputed by migrate.ts when it writes a new or changed rule.
CREATE OR REPLACE FUNCTION fintrail_refresh_measurement_summary(target uuid) RETURNS void LANGUAGE plpgsql AS $$
DECLARE
  latest record;
  pair record;
  recent_max double precision;
  rule record;
BEGIN
  SELECT r.loss_percent, r.loss_window_days INTO rule FROM weight_loss_rule r WHERE r.id;
  IF NOT FOUND THEN
    RAISE EXCEPTION 'weight_loss_rule is empty: scripts/migrate.ts writes it from shared/utils/condition.ts';
  END IF;

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
      AND e.occurred_at >= latest.occurred_at - make_interval(hours => rule.loss_window_days * 24) AND e.occurred_at < latest.occurred_at;
  END IF;

  INSERT INTO fish_measurement_summary AS s (fish_id, weight_g, weighed_at, length_cm, condition_weight_g, condition_k, weight_alert, updated_at)
  VALUES (
    target, latest.weight_g, latest.occurred_at, pair.length_cm, pair.weight_g,
    CASE WHEN pair.length_cm > 0 THEN 100 * pair.weight_g / power(pair.length_cm, 3) END,
    coalesce(recent_max > 0 AND 100 * (latest.weight_g - recent_max) / recent_max <= -rule.loss_percent + 1e-9, false), now()
  )
  ON CONFLICT (fish_id) DO UPDATE SET weight_g = excluded.weight_g, weighed_at = excluded.weighed_at, length_cm = excluded.length_cm,
    condition_weight_g = excluded.condition_weight_g, condition_k = excluded.condition_k, weight_alert = excluded.weight_alert, updated_at = now();
END;
$$;
