import { eq } from 'drizzle-orm'
import { MEASURED_WATER_PARAMETERS, targetFor, unionizedAmmoniaOf, WATER_PARAMETER_INFO, WATER_PARAMETERS, WATER_TARGET_EDITORS, waterFlags, type PondWaterTargets } from '#shared/utils/water-targets'
import type { PondRole } from '#shared/types'
import type { WaterReadingValues, WaterTestView } from '#shared/types/water'

type WaterTestRow = typeof schema.waterTests.$inferSelect

export async function pondWaterTargets(pondId: string): Promise<PondWaterTargets> {
  const [pond] = await useDb().select({ waterTargets: schema.ponds.waterTargets }).from(schema.ponds).where(eq(schema.ponds.id, pondId))
  return pond?.waterTargets ?? {}
}

/** The answer's shape: the readings, who tested, the computed NH3-N and a flag per value against the pond's targets. */
export function waterTestView(row: WaterTestRow, testedByName: string, targets: PondWaterTargets): WaterTestView {
  const readings = Object.fromEntries(MEASURED_WATER_PARAMETERS.map(p => [p, row[p] ?? null])) as WaterReadingValues
  return {
    id: row.id,
    pondId: row.pondId,
    testedAt: row.testedAt.toISOString(),
    testedBy: { id: row.testedById, name: testedByName },
    ...readings,
    notes: row.notes,
    unionizedAmmoniaNMgL: unionizedAmmoniaOf(readings),
    flags: waterFlags(readings, targets),
    createdAt: row.createdAt.toISOString(),
  }
}

/** Each parameter's range as a fixed pond range or the default with its source; TAN's default depends on each test. */
export function waterTargetsView(targets: PondWaterTargets, role: PondRole, readOnly: boolean) {
  return {
    targets: Object.fromEntries(WATER_PARAMETERS.map(p => [p, { ...targetFor(p, targets), label: WATER_PARAMETER_INFO[p].label, unit: WATER_PARAMETER_INFO[p].unit }])),
    canEdit: !readOnly && WATER_TARGET_EDITORS.includes(role),
  }
}
