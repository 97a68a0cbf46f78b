import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { randomUUID } from 'node:crypto'
import { closeTestDb, testDb } from '../support/db'
import { createFish, pondWithRoles } from '../support/factories'
import { addEntry, daysAgo } from '../support/timeline'

afterAll(closeTestDb)

const ENTRIES = 5000
let world: Awaited<ReturnType<typeof pondWithRoles>>
let fishId: string

// Twenty years of a busy fish: 5,000 entries of mixed kinds, several sharing a timestamp so the
// id must break ties. Written straight into the tables, each with its first revision.
beforeAll(async () => {
  world = await pondWithRoles()
  fishId = (await createFish(world.owner.client, world.pond.id, { name: 'Thousands' })).id
  await testDb().query(`
    with made as (
      insert into timeline_entries (fish_id, pond_id, kind, occurred_at, author_id, data)
      select $1, $2, (array['measurement','observation','measurement','treatment','exam'])[1 + i % 5]::timeline_kind,
        timestamptz '2006-01-01 12:00Z' + ((i / 2) * interval '2 days'), $3,
        case i % 5
          when 0 then jsonb_build_object('weightG', 500 + i, 'lengthCm', 30 + i / 250.0, 'lengthType', 'total')
          when 2 then jsonb_build_object('weightG', 500 + i, 'lengthType', 'total')
          when 1 then jsonb_build_object('signs', jsonb_build_array('eating_well'), 'text', 'Entry ' || i)
          when 3 then jsonb_build_object('drug', 'Salt', 'route', 'bath', 'dose', 3, 'doseUnit', 'g/L', 'startOn', '2006-01-01', 'durationDays', 3)
          else jsonb_build_object('findings', '[]'::jsonb, 'assessment', 'Routine ' || i)
        end
      from generate_series(1, ${ENTRIES}) i
      returning id, occurred_at, data, author_id
    )
    insert into timeline_revisions (entry_id, revision, occurred_at, data, author_id)
    select id, 1, occurred_at, data, author_id from made`, [fishId, world.pond.id, world.vet.user.id])
  await testDb().query('analyze timeline_entries')
})

type Page = { entries: { id: string, kind: string, occurredAt: string }[], nextCursor: string | null }

async function readAll(query: string) {
  const seen: Page['entries'] = []
  let cursor: string | null = null
  let pages = 0
  do {
    const response: { status: number, body: Page } = await world.keeper.client.get(`/api/fish/${fishId}/timeline?${query}${cursor ? `&before=${cursor}` : ''}`)
    expect(response.status).toBe(200)
    seen.push(...response.body.entries)
    cursor = response.body.nextCursor
    pages++
  } while (cursor && pages < 1000)
  return { seen, pages }
}

describe('a fish with 5,000 entries', () => {
  it('pages through every entry once, newest first, with ties broken by id', async () => {
    const { seen, pages } = await readAll('limit=200')
    expect(pages).toBe(25)
    expect(seen).toHaveLength(ENTRIES)
    expect(new Set(seen.map(e => e.id)).size).toBe(ENTRIES)
    const { rows } = await testDb().query('select id from timeline_entries where fish_id = $1 order by occurred_at desc, id desc', [fishId])
    expect(seen.map(e => e.id)).toEqual(rows.map(r => r.id))
  })

  it('filters by kind across pages', async () => {
    const { seen } = await readAll('limit=150&kind=treatment,exam')
    expect(seen).toHaveLength(2000)
    expect(new Set(seen.map(e => e.kind))).toEqual(new Set(['treatment', 'exam']))
    const first = await world.keeper.client.get(`/api/fish/${fishId}/timeline?kind=photo`)
    expect(first.body).toEqual({ entries: [], nextCursor: null })
  })

  it('refuses a page marker it did not make', async () => {
    const response = await world.keeper.client.get(`/api/fish/${fishId}/timeline?before=bm90LWEtY3Vyc29y`)
    expect(response.status).toBe(400)
    expect(response.body.data.fieldErrors.before).toEqual(['Not a page marker from this timeline'])
    expect((await world.keeper.client.get(`/api/fish/${fishId}/timeline?limit=5000`)).body.data.fieldErrors.limit).toEqual(['At most 200'])
    expect((await world.keeper.client.get(`/api/fish/${fishId}/timeline?kind=weather`)).status).toBe(400)
  })
})

describe('photos in the timeline', () => {
  it('shows ready photos that are not removed, dated when taken, among the entries', async () => {
    const fish = await createFish(world.owner.client, world.pond.id, { name: 'Photogenic' })
    await addEntry(world.keeper.client, fish.id, { kind: 'measurement', occurredAt: daysAgo(5), data: { weightG: 700 } })
    const insert = (state: string, takenAt: string | null, removed: boolean) => testDb().query(
      `insert into photos (fish_id, uploader_id, upload_id, caption, view, taken_at, state, removed_at)
       values ($1, $2, $3, 'From above', 'top', $4, $5, $6) returning id`,
      [fish.id, world.keeper.user.id, randomUUID(), takenAt, state, removed ? new Date() : null])
    const ready = (await insert('ready', `${daysAgo(3)}T09:00:00Z`, false)).rows[0].id
    await insert('pending', `${daysAgo(2)}T09:00:00Z`, false)
    await insert('ready', `${daysAgo(1)}T09:00:00Z`, true)
    const entries = (await world.keeper.client.get(`/api/fish/${fish.id}/timeline`)).body.entries
    expect(entries.map((e: { kind: string }) => e.kind)).toEqual(['photo', 'measurement'])
    expect(entries[0]).toMatchObject({ id: ready, photo: { id: ready, caption: 'From above', view: 'top' }, author: { name: 'Keeper' }, canAmend: false })
    expect(entries[0].occurredAt).toBe(`${daysAgo(3)}T09:00:00.000Z`)
    const photosOnly = (await world.keeper.client.get(`/api/fish/${fish.id}/timeline?kind=photo`)).body.entries
    expect(photosOnly.map((e: { id: string }) => e.id)).toEqual([ready])
  })
})
