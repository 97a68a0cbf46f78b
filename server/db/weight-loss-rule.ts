import { sql } from 'drizzle-orm'
import type { NodePgDatabase } from 'drizzle-orm/node-postgres'
import { WEIGHT_LOSS_RULE } from '../../shared/utils/condition'

/**
 * Writes WEIGHT_LOSS_RULE into the weight_loss_rule row the fish list's flag is computed from in SQL, and
 * recomputes every summary when the row was new or its numbers changed. Returns whether it did.
 * Runs in scripts/migrate.ts before any server starts, so SQL and TypeScript always read the same numbers.
 */
export async function writeWeightLossRule(db: Pick<NodePgDatabase, 'execute'>) {
  const { lossPercent, lossWindowDays } = WEIGHT_LOSS_RULE
  const written = await db.execute(sql`
    insert into weight_loss_rule (id, loss_percent, loss_window_days) values (true, ${lossPercent}, ${lossWindowDays})
    on conflict (id) do update set loss_percent = excluded.loss_percent, loss_window_days = excluded.loss_window_days, updated_at = now()
    where (weight_loss_rule.loss_percent, weight_loss_rule.loss_window_days) is distinct from (excluded.loss_percent, excluded.loss_window_days)
    returning id`)
  if (!written.rowCount) return false
  await db.execute(sql`select fintrail_refresh_measurement_summary(fish_id) from fish_measurement_summary`)
  return true
}
