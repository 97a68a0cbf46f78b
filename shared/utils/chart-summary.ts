// What a chart says in one sentence, for people who cannot see it: the latest value and how it moved.
// Pure arithmetic on the points the chart draws; the words and units are added by the page.

const DAY_MS = 86_400_000

export interface DatedValue { at: string, value: number }

export interface LatestChange {
  latest: DatedValue
  /** The reading compared with: the last one at least `minDays` before the latest, else the first one. */
  earlier: DatedValue | null
  /** Relative change (new − old) / old × 100, rounded to a whole percent; null when the earlier value is 0. */
  changePercent: number | null
  days: number
}

/**
 * The latest reading and its change since a reading about `minDays` or more before it
 * (the default 30 days is the window the weight-loss alerts use; common practice).
 */
export function latestChange(points: DatedValue[], minDays = 30): LatestChange | null {
  const sorted = points.filter(p => Number.isFinite(p.value) && !Number.isNaN(Date.parse(p.at)))
    .sort((a, b) => Date.parse(a.at) - Date.parse(b.at))
  const latest = sorted.at(-1)
  if (!latest) return null
  const before = sorted.slice(0, -1)
  const cutoff = Date.parse(latest.at) - minDays * DAY_MS
  const earlier = before.filter(p => Date.parse(p.at) <= cutoff).at(-1) ?? before[0] ?? null
  if (!earlier) return { latest, earlier: null, changePercent: null, days: 0 }
  const days = Math.round((Date.parse(latest.at) - Date.parse(earlier.at)) / DAY_MS)
  const changePercent = earlier.value === 0 ? null : Math.round(((latest.value - earlier.value) / earlier.value) * 100)
  return { latest, earlier, changePercent, days }
}

/** "down 8 % in 60 days", "up 3 % in 45 days", "unchanged in 30 days". */
export function changeWords(change: LatestChange): string {
  if (!change.earlier || change.changePercent === null) return ''
  const span = change.days === 1 ? '1 day' : `${change.days} days`
  if (change.changePercent === 0) return `unchanged in ${span}`
  return `${change.changePercent < 0 ? 'down' : 'up'} ${Math.abs(change.changePercent)} % in ${span}`
}
