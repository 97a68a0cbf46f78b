// Water tests of the invented demo ponds, dated back from the day of seeding so the water log, its charts and the
// due list look lived-in. The numbers tell small stories a keeper meets: the Garden pond's nitrite rose after the
// filter was cleaned and its KH drifted down as autumn came; the Courtyard pond is tested every two weeks.
import * as schema from '../../server/db/schema'
import type { PersonKey } from './people'
import type { SeedTx } from './histories'

interface WaterSeedContext { people: Record<PersonKey, string>, ponds: { garden: string, courtyard: string, whitlock: string } }

const DAY_MS = 86_400_000
const round = (value: number, places: number) => Number(value.toFixed(places))

export async function seedWaterTests(tx: SeedTx, { people, ponds }: WaterSeedContext, now = new Date()) {
  const at = (daysAgo: number, hour: number) => {
    const day = new Date(now.getTime() - daysAgo * DAY_MS)
    day.setUTCHours(hour, 0, 0, 0)
    return day
  }
  const rows: (typeof schema.waterTests.$inferInsert)[] = []
  // Weekly in the Garden pond for twelve weeks, alternating the two keepers; the week after the filter clean shows nitrite.
  for (let week = 12; week >= 1; week--) {
    const daysAgo = week * 7 - 5
    const spike = week === 6 ? 0.3 : week === 5 ? 0.12 : 0
    rows.push({
      pondId: ponds.garden, testedAt: at(daysAgo, 9), testedById: week % 2 ? people.keeper : people.family,
      temperatureC: round(7 + week * 0.7, 1), pH: round(7.5 + Math.min(week, 8) * 0.04, 2), tanMgL: round(0.1 + spike / 3, 2),
      nitriteNMgL: round(0.02 + spike, 2), nitrateNMgL: round(6 + (12 - week) * 0.4, 1), khDKH: round(4 + week * 0.25, 1),
      dissolvedOxygenMgL: round(11 - week * 0.2, 1),
      notes: week === 6 ? 'Bead filter backwashed and half the media rinsed two days ago.' : '',
    })
  }
  // Every two weeks in the Courtyard pond, temperature and pH only on most days.
  for (let fortnight = 6; fortnight >= 1; fortnight--) {
    rows.push({
      pondId: ponds.courtyard, testedAt: at(fortnight * 14 - 4, 17), testedById: people.family,
      temperatureC: round(6 + fortnight * 1.1, 1), pH: round(7.8 - fortnight * 0.03, 2), tanMgL: fortnight % 2 ? 0.25 : null,
      nitriteNMgL: fortnight % 2 ? 0.05 : null, khDKH: fortnight % 2 ? 5 : null,
    })
  }
  // The vet's monthly visits to the Whitlock pond, with a full panel.
  for (const month of [3, 2, 1]) {
    rows.push({
      pondId: ponds.whitlock, testedAt: at(month * 30 - 10, 11), testedById: people.vet,
      temperatureC: round(8 + month * 2.5, 1), pH: 7.7, tanMgL: 0.15, nitriteNMgL: 0.03, nitrateNMgL: round(12 - month, 1),
      khDKH: 6, ghDGH: 9, dissolvedOxygenMgL: round(10 - month * 0.6, 1), salinityPpt: month === 2 ? 1.5 : null,
      notes: month === 2 ? 'Salt raised to 0.15 % for the ulcer treatment.' : '',
    })
  }
  await tx.insert(schema.waterTests).values(rows)
}
