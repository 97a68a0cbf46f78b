import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import pg from 'pg'
import { closeTestDb, testDb } from '../support/db'
import { testEnv } from '../support/env'
import { createFish, pondWithRoles } from '../support/factories'
import { addEntry, countEntries, daysAgo, sampleEntries } from '../support/timeline'

afterAll(closeTestDb)

let world: Awaited<ReturnType<typeof pondWithRoles>>
beforeAll(async () => {
  world = await pondWithRoles()
})

const amend = (who: 'owner' | 'keeper' | 'vet' | 'outsider', entryId: string, body: unknown) => world[who].client.post(`/api/timeline/${entryId}/amend`, body)

describe('amendments never erase', () => {
  it('keeps every revision, shows the current one as amended, and refuses a stale revision', async () => {
    const { entry } = await addEntry(world.keeper.client, world.fish.id, { kind: 'measurement', occurredAt: daysAgo(20), data: { weightG: 1500, lengthCm: 40 } })
    const first = await amend('keeper', entry.id, { revision: 1, data: { weightG: 1050, lengthCm: 40 }, reason: 'Read the scale in the wrong unit' })
    expect(first.status, JSON.stringify(first.body)).toBe(200)
    expect(first.body).toMatchObject({ revision: 2, data: { weightG: 1050 } })
    const stale = await amend('keeper', entry.id, { revision: 1, data: { weightG: 1, lengthCm: 40 }, reason: 'Late edit' })
    expect(stale.status).toBe(409)
    const second = await amend('keeper', entry.id, { revision: 2, occurredAt: daysAgo(21), data: { weightG: 1050, lengthCm: 40.5, lengthType: 'total' }, reason: 'Length re-measured' })
    expect(second.status).toBe(200)

    const revisions = await world.vet.client.get(`/api/timeline/${entry.id}/revisions`)
    expect(revisions.status).toBe(200)
    expect(revisions.body.map((r: { revision: number }) => r.revision)).toEqual([1, 2, 3])
    expect(revisions.body[0]).toMatchObject({ data: { weightG: 1500 }, reason: null, author: { name: 'Keeper' } })
    expect(revisions.body[1]).toMatchObject({ data: { weightG: 1050 }, reason: 'Read the scale in the wrong unit' })
    expect(revisions.body[2].occurredAt.slice(0, 10)).toBe(daysAgo(21))

    const page = await world.owner.client.get(`/api/fish/${world.fish.id}/timeline?kind=measurement`)
    const shown = page.body.entries.find((e: { id: string }) => e.id === entry.id)
    expect(shown).toMatchObject({ revision: 3, data: { lengthCm: 40.5 } })
    // 100 · 1050 / 40.5³ = 105000 / 66430.1 = 1.5806 (Fulton; Nash et al. 2006).
    expect(shown.derived.conditionK).toBeCloseTo(1.5806, 3)
    expect((await world.outsider.client.get(`/api/timeline/${entry.id}/revisions`)).status).toBe(404)
  })

  it('checks the amended fields against the entry’s own kind', async () => {
    const { entry } = await addEntry(world.vet.client, world.fish.id, sampleEntries(world.fish.id).exam)
    const response = await amend('vet', entry.id, { revision: 1, data: { findings: [{ system: 'gills', state: 'abnormal' }] }, reason: 'Added the gills' })
    expect(response.status).toBe(400)
    expect(response.body.data.fieldErrors['data.findings.0.note']).toEqual(['Describe what is abnormal'])
    const noReason = await amend('vet', entry.id, { revision: 1, data: sampleEntries(world.fish.id).exam.data, reason: '' })
    expect(noReason.body.data.fieldErrors.reason).toEqual(['Say why in a few words'])
  })

  it('lets the author amend, an owner amend non-clinical entries only, and nobody else', async () => {
    const observation = await addEntry(world.keeper.client, world.fish.id, sampleEntries(world.fish.id).observation)
    const exam = await addEntry(world.vet.client, world.fish.id, sampleEntries(world.fish.id).exam)
    const body = (data: unknown) => ({ revision: 1, data, reason: 'Clearer wording' })
    const obsData = { signs: ['flashing'], text: 'Flashing, mostly at dusk' }
    expect((await amend('vet', observation.entry.id, body(obsData))).status).toBe(403)
    expect((await amend('outsider', observation.entry.id, body(obsData))).status).toBe(404)
    expect((await amend('owner', observation.entry.id, body(obsData))).status).toBe(200)
    const examData = { ...sampleEntries(world.fish.id).exam.data, plan: 'Recheck in two weeks' }
    const byOwner = await amend('owner', exam.entry.id, body(examData))
    expect(byOwner.status).toBe(403)
    expect(byOwner.body.message).toBe('Only the vet who wrote this clinical entry can amend it')
    expect((await amend('vet', exam.entry.id, body(examData))).status).toBe(200)
  })

  it('does not let a keeper turn a suspected problem into a confirmed one by amending it', async () => {
    const { entry } = await addEntry(world.keeper.client, world.fish.id, sampleEntries(world.fish.id).problemSuspected)
    const response = await amend('keeper', entry.id, { revision: 1, data: { ...sampleEntries(world.fish.id).problemSuspected.data, status: 'active' }, reason: 'Sure now' })
    expect(response.status).toBe(403)
    expect(response.body.data.fieldErrors['data.status'][0]).toMatch(/suspected/)
  })
})

describe('entered in error', () => {
  it('stays visible with its reason, cannot be amended, and leaves every computation', async () => {
    const fish = await createFish(world.owner.client, world.pond.id, { name: 'Scales' })
    await addEntry(world.keeper.client, fish.id, { kind: 'measurement', occurredAt: daysAgo(60), data: { weightG: 1000, lengthCm: 40 } })
    await addEntry(world.keeper.client, fish.id, { kind: 'measurement', occurredAt: daysAgo(40), data: { weightG: 1010, lengthCm: 40 } })
    // 400 g is implausible (K 0.63, −60 % in 30 days): saved only with the warnings acknowledged, as "Save anyway" does.
    const wrong = await addEntry(world.keeper.client, fish.id, { kind: 'measurement', occurredAt: daysAgo(10), data: { weightG: 400, lengthCm: 40 }, acknowledgedWarnings: ['condition_factor', 'weight_jump'] })

    // Before: the 400 g weighing is the latest, and 400 g from 1010 g in 30 days is a loss alert.
    expect((await world.vet.client.get(`/api/fish/${fish.id}/facts`)).body.latestWeight.weightG).toBe(400)
    expect((await world.vet.client.get(`/api/fish/${fish.id}/growth`)).body.alerts).toHaveLength(1)
    const listed = async () => (await world.vet.client.get(`/api/ponds/${world.pond.id}/fish`)).body.find((f: { id: string }) => f.id === fish.id)
    expect(await listed()).toMatchObject({ latestWeightG: 400, weightAlert: true })

    expect((await world.keeper.client.post(`/api/timeline/${wrong.entry.id}/entered-in-error`, { reason: '' })).status).toBe(400)
    const marked = await world.keeper.client.post(`/api/timeline/${wrong.entry.id}/entered-in-error`, { reason: 'Weighed Pebble, not Scales' })
    expect(marked.status).toBe(200)
    expect(marked.body).toMatchObject({ enteredInError: true, errorReason: 'Weighed Pebble, not Scales', errorBy: 'Keeper', canAmend: false })
    expect((await world.keeper.client.post(`/api/timeline/${wrong.entry.id}/entered-in-error`, { reason: 'Again' })).status).toBe(409)
    expect((await amend('keeper', wrong.entry.id, { revision: 1, data: { weightG: 410, lengthCm: 40 }, reason: 'Try' })).status).toBe(409)

    const facts = (await world.vet.client.get(`/api/fish/${fish.id}/facts`)).body
    expect(facts.latestWeight.weightG).toBe(1010)
    const growth = (await world.vet.client.get(`/api/fish/${fish.id}/growth`)).body
    expect(growth.points.map((p: { weightG: number }) => p.weightG)).toEqual([1000, 1010])
    expect(growth.alerts).toEqual([])
    expect(await listed()).toMatchObject({ latestWeightG: 1010, weightAlert: false })
    // 100 · 1010 / 40³ = 1.578125 (Fulton; Nash et al. 2006).
    expect((await listed()).latestConditionK).toBeCloseTo(1.578125, 6)
    const lengthWeight = (await world.vet.client.get(`/api/ponds/${world.pond.id}/length-weight`)).body
    const points = lengthWeight.series.flatMap((s: { fish: { id: string, points: { weightG: number }[] }[] }) => s.fish).find((f: { id: string }) => f.id === fish.id).points
    expect(points.map((p: { weightG: number }) => p.weightG)).toEqual([1000, 1010])

    const page = (await world.owner.client.get(`/api/fish/${fish.id}/timeline`)).body.entries
    expect(page.find((e: { id: string }) => e.id === wrong.entry.id)).toMatchObject({ enteredInError: true, data: { weightG: 400 } })
  })

  it('brings a fish back to life when its only death is entered in error', async () => {
    const fish = await createFish(world.owner.client, world.pond.id, { name: 'Lazarus' })
    const death = await addEntry(world.owner.client, fish.id, sampleEntries(fish.id).death)
    expect((await world.owner.client.get(`/api/fish/${fish.id}`)).body.status).toBe('deceased')
    expect((await world.owner.client.post(`/api/fish/${fish.id}/timeline`, sampleEntries(fish.id).death)).body.data.fieldErrors._[0]).toMatch(/already recorded/)
    expect((await world.keeper.client.post(`/api/timeline/${death.entry.id}/entered-in-error`, { reason: 'Was hiding under the lily pads' })).status).toBe(403)
    expect((await world.owner.client.post(`/api/timeline/${death.entry.id}/entered-in-error`, { reason: 'Was hiding under the lily pads' })).status).toBe(200)
    expect((await world.owner.client.get(`/api/fish/${fish.id}`)).body.status).toBe('alive')
    expect((await world.owner.client.get(`/api/fish/${fish.id}/facts`)).body.death).toBeNull()
  })
})

describe('the database keeps every row, whatever the app does', () => {
  // The app connects as this role (not a superuser); these are the statements a bug or an intruder in the app could send.
  async function asAppRole<T>(work: (client: pg.Client) => Promise<T>) {
    const client = new pg.Client({ connectionString: testEnv().databaseUrl })
    await client.connect()
    try {
      const { rows } = await client.query('select current_user as who, rolsuper from pg_roles where rolname = current_user')
      expect(rows[0]).toEqual({ who: 'fintrail', rolsuper: false })
      return await work(client)
    }
    finally {
      await client.end()
    }
  }

  it('refuses DELETE and TRUNCATE on the timeline tables, and UPDATE of a revision', async () => {
    const { entry } = await addEntry(world.keeper.client, world.fish.id, sampleEntries(world.fish.id).observation)
    await asAppRole(async (db) => {
      await expect(db.query('delete from timeline_entries where id = $1', [entry.id])).rejects.toThrow(/append-only: DELETE on timeline_entries/)
      await expect(db.query('truncate timeline_entries cascade')).rejects.toThrow(/append-only: TRUNCATE/)
      await expect(db.query('delete from timeline_revisions where entry_id = $1', [entry.id])).rejects.toThrow(/append-only: DELETE on timeline_revisions/)
      await expect(db.query(`update timeline_revisions set data = '{}' where entry_id = $1`, [entry.id])).rejects.toThrow(/append-only: UPDATE on timeline_revisions/)
    })
    expect(await countEntries(world.fish.id)).toBeGreaterThan(0)
    const { rows } = await testDb().query('select count(*)::int as n from timeline_revisions where entry_id = $1', [entry.id])
    expect(rows[0].n).toBe(1)
  })

  it('refuses a silent change of an entry: no new revision, a changed author, an error mark taken back', async () => {
    const { entry } = await addEntry(world.keeper.client, world.fish.id, sampleEntries(world.fish.id).observation)
    await asAppRole(async (db) => {
      await expect(db.query(`update timeline_entries set data = '{"text":"quietly changed"}' where id = $1`, [entry.id])).rejects.toThrow(/revision 2/)
      await expect(db.query(`update timeline_entries set data = '{"text":"x"}', revision = 2 where id = $1`, [entry.id])).rejects.toThrow(/write revision 2/)
      await expect(db.query('update timeline_entries set author_id = $2 where id = $1', [entry.id, world.vet.user.id])).rejects.toThrow(/never change/)
      await expect(db.query(`update timeline_entries set entered_in_error = true where id = $1`, [entry.id])).rejects.toThrow(/needs a reason/)
    })
    await world.keeper.client.post(`/api/timeline/${entry.id}/entered-in-error`, { reason: 'Wrong fish' })
    await asAppRole(async (db) => {
      await expect(db.query('update timeline_entries set entered_in_error = false where id = $1', [entry.id])).rejects.toThrow(/is final/)
    })
    const { rows } = await testDb().query('select data, entered_in_error from timeline_entries where id = $1', [entry.id])
    expect(rows[0]).toMatchObject({ entered_in_error: true, data: { text: 'Flashing against the wall after feeding' } })
  })
})
