import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { closeTestDb, testDb } from '../support/db'
import { createFish, pondWithRoles } from '../support/factories'
import { addEntry, daysAgo, sampleEntries } from '../support/timeline'

afterAll(closeTestDb)

type Summary = { asOf: string, entryCount: number, pond: { name: string }, owners: { name: string }[], vets: { name: string, entries: number }[], pageSize: number }
type Page = { entries: { id: string, kind: string, occurredAt: string, data: Record<string, unknown>, linkedEntryId: string | null }[], nextCursor: string | null }

let world: Awaited<ReturnType<typeof pondWithRoles>>
beforeAll(async () => {
  world = await pondWithRoles()
})

async function readRecord(fishId: string, limit?: number) {
  const head = await world.keeper.client.get(`/api/fish/${fishId}/record`)
  expect(head.status, JSON.stringify(head.body)).toBe(200)
  const summary = head.body as Summary
  const entries: Page['entries'] = []
  let after: string | null = null
  let pages = 0
  do {
    const query = new URLSearchParams({ asOf: summary.asOf, ...(limit ? { limit: String(limit) } : {}), ...(after ? { after } : {}) })
    const response: { status: number, body: Page } = await world.keeper.client.get(`/api/fish/${fishId}/record/entries?${query}`)
    expect(response.status, JSON.stringify(response.body)).toBe(200)
    entries.push(...response.body.entries)
    after = response.body.nextCursor
    pages++
  } while (after && pages < 100)
  return { summary, entries, pages }
}

describe('the health record', () => {
  it('holds every kind a vet writes — exams, lab results with their intervals, anaesthesia with its procedure — and says how many entries it has', async () => {
    const fish = await createFish(world.owner.client, world.pond.id, { name: 'Ledger' })
    const samples = sampleEntries(world.fish.id, world.vet.user.id)
    await addEntry(world.keeper.client, fish.id, samples.measurement)
    await addEntry(world.vet.client, fish.id, samples.exam)
    await addEntry(world.vet.client, fish.id, samples.problemActive)
    const lab = await addEntry(world.vet.client, fish.id, samples.labResult)
    const anaesthesia = await addEntry(world.vet.client, fish.id, samples.anaesthesia)
    const procedure = await addEntry(world.vet.client, fish.id, { ...samples.procedure, data: { ...samples.procedure.data, anaesthesiaEntryId: anaesthesia.entry.id } })
    await addEntry(world.vet.client, fish.id, samples.treatmentPrescribed)
    await addEntry(world.keeper.client, fish.id, samples.treatmentGiven)
    // A keeper's suspected problem is not clinical: the keeper is not listed among the vets who treated the fish.
    await addEntry(world.keeper.client, fish.id, samples.problemSuspected)
    await addEntry(world.keeper.client, world.fish.id, { ...samples.companion, data: { ...samples.companion.data, relatedFishId: fish.id } })

    const { summary, entries } = await readRecord(fish.id)
    expect(summary.entryCount).toBe(10)
    expect(entries).toHaveLength(10)
    expect(summary.pond.name).toBe(world.pond.name)
    expect(summary.owners.map(o => o.name)).toEqual(['Owner'])
    expect(summary.vets).toEqual([expect.objectContaining({ name: 'Vet', entries: 6 })])
    const kinds = entries.map(e => e.kind)
    for (const kind of ['exam', 'lab_result', 'anaesthesia', 'procedure', 'treatment', 'problem', 'measurement', 'companion']) expect(kinds).toContain(kind)
    expect(entries.find(e => e.id === lab.entry.id)!.data).toMatchObject({ intervalSource: 'Laboratory report', analytes: [{ low: 24, high: 43 }] })
    expect(entries.find(e => e.id === procedure.entry.id)!.linkedEntryId).toBe(anaesthesia.entry.id)
    // Oldest first, so the printed record reads as the fish lived it.
    const times = entries.map(e => e.occurredAt)
    expect(times).toEqual([...times].sort())
  })

  it('holds the entries written up to the moment it was opened, not those written while it is read', async () => {
    const fish = await createFish(world.owner.client, world.pond.id, { name: 'Snapshot' })
    await addEntry(world.keeper.client, fish.id, { kind: 'measurement', occurredAt: daysAgo(3), data: { weightG: 900 } })
    const head = (await world.keeper.client.get(`/api/fish/${fish.id}/record`)).body as Summary
    await addEntry(world.keeper.client, fish.id, { kind: 'measurement', occurredAt: daysAgo(200), data: { weightG: 800 } })
    const page = await world.keeper.client.get(`/api/fish/${fish.id}/record/entries?asOf=${encodeURIComponent(head.asOf)}`)
    expect(head.entryCount).toBe(1)
    expect(page.body.entries.map((e: { data: { weightG: number } }) => e.data.weightG)).toEqual([900])
  })

  it('reads 5,000 entries over twenty years in bounded pages, each entry once', async () => {
    const fish = await createFish(world.owner.client, world.pond.id, { name: 'Longlife' })
    await testDb().query(`
      with made as (
        insert into timeline_entries (fish_id, pond_id, kind, occurred_at, author_id, data)
        select $1, $2, 'observation', timestamptz '2006-03-01 09:00Z' + ((i / 2) * interval '35 hours'), $3,
          jsonb_build_object('signs', '[]'::jsonb, 'text', 'Note ' || i)
        from generate_series(1, 5000) i
        returning id, occurred_at, data, author_id
      )
      insert into timeline_revisions (entry_id, revision, occurred_at, data, author_id)
      select id, 1, occurred_at, data, author_id from made`, [fish.id, world.pond.id, world.keeper.user.id])
    const { summary, entries, pages } = await readRecord(fish.id)
    expect(summary.entryCount).toBe(5000)
    expect(pages).toBe(Math.ceil(5000 / summary.pageSize))
    expect(new Set(entries.map(e => e.id)).size).toBe(5000)
    const { rows } = await testDb().query('select id from timeline_entries where fish_id = $1 order by occurred_at, id', [fish.id])
    expect(entries.map(e => e.id)).toEqual(rows.map(r => r.id))
    expect(entries[0]!.occurredAt).toBe('2006-03-01T09:00:00.000Z')
  })

  it('answers 404 to a non-member and 400 with field messages to a bad page request', async () => {
    expect((await world.outsider.client.get(`/api/fish/${world.fish.id}/record`)).status).toBe(404)
    expect((await world.outsider.client.get(`/api/fish/${world.fish.id}/record/entries?asOf=2026-01-01T00:00:00Z`)).status).toBe(404)
    const noMoment = await world.keeper.client.get(`/api/fish/${world.fish.id}/record/entries`)
    expect(noMoment.status).toBe(400)
    expect(Object.keys(noMoment.body.data.fieldErrors)).toContain('asOf')
    const badCursor = await world.keeper.client.get(`/api/fish/${world.fish.id}/record/entries?asOf=2026-01-01T00:00:00Z&after=nonsense`)
    expect(badCursor.status).toBe(400)
    expect(badCursor.body.data.fieldErrors.after).toEqual(['Not a page marker from this timeline'])
    const tooMany = await world.keeper.client.get(`/api/fish/${world.fish.id}/record/entries?asOf=2026-01-01T00:00:00Z&limit=5000`)
    expect(tooMany.status).toBe(400)
    expect(tooMany.body.data.fieldErrors.limit).toEqual(['At most 1000'])
  })
})
