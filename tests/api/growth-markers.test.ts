import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { closeTestDb, testDb } from '../support/db'
import { createFish, pondWithRoles } from '../support/factories'

afterAll(closeTestDb)

const EACH = 300
let world: Awaited<ReturnType<typeof pondWithRoles>>
let busyId: string
let quietId: string
type Marker = { entryId: string, at: string, kind: string, label: string, count: number }

// Ten years of a fish treated and operated on every ~12 days (300 procedures, 300 treatments) and one death,
// written straight into the table; and a fish with three markers, which are all sent as they are.
beforeAll(async () => {
  world = await pondWithRoles()
  busyId = (await createFish(world.owner.client, world.pond.id, { name: 'Often treated' })).id
  quietId = (await createFish(world.owner.client, world.pond.id, { name: 'Seldom treated' })).id
  await testDb().query(`
    insert into timeline_entries (fish_id, pond_id, kind, occurred_at, author_id, data)
    select $1::uuid, $2::uuid, (case when i % 2 = 0 then 'procedure' else 'treatment' end)::timeline_kind,
      timestamptz '2010-01-01 09:00Z' + i * interval '6 days', $3::uuid,
      case when i % 2 = 0 then jsonb_build_object('code', 'fin_trim', 'side', 'left', 'performedBy', 'Dr Vet')
        else jsonb_build_object('drug', 'Salt', 'route', 'pond_immersion', 'dose', 3, 'doseUnit', 'g/L', 'startOn', '2010-01-01', 'durationDays', 3) end
    from generate_series(0, ${2 * EACH - 1}) i
    union all select $1, $2, 'death'::timeline_kind, timestamptz '2015-06-01 12:00Z', $3, '{"cause": "old age"}'::jsonb
    union all select $4::uuid, $2, 'procedure'::timeline_kind, timestamptz '2020-01-01 12:00Z' + i * interval '30 days', $3, '{"code": "fin_trim", "side": "not_applicable"}'::jsonb
    from generate_series(1, 3) i`, [busyId, world.pond.id, world.vet.user.id, quietId])
})

const growth = async (fishId: string, query = '') => {
  const response = await world.keeper.client.get(`/api/fish/${fishId}/growth${query}`)
  expect(response.status, JSON.stringify(response.body)).toBe(200)
  return response.body as { markers: Marker[], totalMarkers: number, markersSampled: boolean }
}
const sumOf = (markers: Marker[], kind: string) => markers.filter(m => m.kind === kind).reduce((sum, m) => sum + m.count, 0)

describe('growth chart markers', () => {
  it('thins a long history to one procedure and one treatment per stretch of time, counting what each stands for', async () => {
    const body = await growth(busyId)
    expect(body.markersSampled).toBe(true)
    expect(body.totalMarkers).toBe(2 * EACH + 1)
    // 24 stretches (GROWTH_MARKER_STRETCHES) × two kinds, and the death apart.
    expect(body.markers.length).toBeLessThanOrEqual(2 * 24 + 1)
    expect(body.markers.length).toBeGreaterThanOrEqual(2 * 20)
    expect(sumOf(body.markers, 'procedure')).toBe(EACH)
    expect(sumOf(body.markers, 'treatment')).toBe(EACH)
    expect(body.markers.filter(m => m.kind === 'death')).toEqual([expect.objectContaining({ count: 1, label: 'Died', at: '2015-06-01T12:00:00.000Z' })])
    const times = body.markers.map(m => Date.parse(m.at))
    expect(times).toEqual([...times].sort((a, b) => a - b))
    // Each stretch shows its first entry: the very first procedure (2010-01-01) and treatment (six days later) are kept.
    expect(body.markers[0]).toMatchObject({ kind: 'procedure', at: '2010-01-01T09:00:00.000Z', label: 'fin trim (left)' })
    expect(body.markers[1]).toMatchObject({ kind: 'treatment', at: '2010-01-07T09:00:00.000Z', label: 'Salt (pond immersion)' })
  })

  it('sends every marker on demand (?markers=all), and a short history always', async () => {
    const every = await growth(busyId, '?markers=all')
    expect(every.markersSampled).toBe(false)
    expect(every.markers).toHaveLength(2 * EACH + 1)
    expect(every.markers.every(m => m.count === 1)).toBe(true)
    const quiet = await growth(quietId)
    expect(quiet).toMatchObject({ markersSampled: false, totalMarkers: 3 })
    expect(quiet.markers.map(m => m.count)).toEqual([1, 1, 1])
  })

  it('refuses an unknown markers value with a field message', async () => {
    const response = await world.keeper.client.get(`/api/fish/${busyId}/growth?markers=some`)
    expect(response.status).toBe(400)
    expect(JSON.stringify(response.body)).toContain('Either chart or all')
    expect((await world.outsider.client.get(`/api/fish/${busyId}/growth?markers=all`)).status).toBe(404)
  })
})
