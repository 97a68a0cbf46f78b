import { sql } from 'drizzle-orm'
import { drizzle } from 'drizzle-orm/node-postgres'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { upgradeLegacyEntries } from '../../server/db/upgrade-entries'
import { closeTestDb, testDb } from '../support/db'
import { createFish, pondWithRoles } from '../support/factories'
import { addEntry, daysAgo, sampleEntries } from '../support/timeline'

afterAll(closeTestDb)

let world: Awaited<ReturnType<typeof pondWithRoles>>
beforeAll(async () => {
  world = await pondWithRoles()
})

const enucleation = (occurredAt: string, side: string) => ({
  kind: 'procedure', occurredAt,
  data: { code: 'enucleation', name: 'Enucleation', bodySite: 'eye', side, performedBy: 'Dr Vet', outcome: 'Sutured, swimming on recovery' },
})

describe('standing facts come from the entries', () => {
  it('takes an eye removal from the procedure code, whatever it is called', async () => {
    const fish = await createFish(world.owner.client, world.pond.id, { name: 'Coded' })
    const worded = await addEntry(world.vet.client, fish.id, {
      kind: 'procedure', occurredAt: '2024-02-01', data: { code: 'mass_removal', name: 'Removal of the left eye', side: 'left', performedBy: 'Dr Vet' },
    })
    expect(worded.entry.id).toBeTruthy()
    expect((await world.keeper.client.get(`/api/fish/${fish.id}/facts`)).body.eyes).toEqual({ left: null, right: null, summary: '' })
    const coded = await addEntry(world.vet.client, fish.id, {
      kind: 'procedure', occurredAt: '2024-03-05', data: { code: 'enucleation', name: 'Tidy-up of the socket area', side: 'left', performedById: world.vet.user.id },
    })
    const facts = (await world.keeper.client.get(`/api/fish/${fish.id}/facts`)).body
    expect(facts.eyes.left).toEqual({ on: '2024-03-05', entryId: coded.entry.id })
    expect(facts.eyes.summary).toBe('left eye removed 2024-03-05 — right eye only')
    // "Performed by" chosen from the pond's vets carries the vet's name; anyone else is refused.
    expect((coded.entry.data as { performedBy: string }).performedBy).toBe('Vet')
    const notAVet = await world.vet.client.post(`/api/fish/${fish.id}/timeline`, {
      kind: 'procedure', occurredAt: '2024-03-06', data: { code: 'biopsy', side: 'right', performedById: world.keeper.user.id },
    })
    expect(notAVet.status).toBe(400)
    expect(notAVet.body.data.fieldErrors['data.performedById']).toEqual(['Choose one of the pond’s vets'])
  })

  it('carries the last anaesthesia and the count of long recoveries', async () => {
    const fish = await createFish(world.owner.client, world.pond.id, { name: 'Sleepy' })
    expect((await world.owner.client.get(`/api/fish/${fish.id}/facts`)).body.lastAnaesthesia).toBeNull()
    const agent = 'MS-222 (tricaine methanesulfonate)'
    await addEntry(world.vet.client, fish.id, { kind: 'anaesthesia', occurredAt: '2023-05-01', data: { agent, concentrationMgL: 100, buffer: 'Sodium bicarbonate', recoveryMinutes: 45 } })
    const slow = await addEntry(world.vet.client, fish.id, {
      kind: 'procedure', occurredAt: '2025-06-10', data: { code: 'biopsy', side: 'left', performedBy: 'Dr Vet' },
      anaesthesia: { agent, concentrationMgL: 120, waterTemperatureC: 19, inductionMinutes: 4, recoveryMinutes: 31 },
    })
    const facts = (await world.owner.client.get(`/api/fish/${fish.id}/facts`)).body
    // Common practice: a recovery over 30 minutes is long (31 is, 30 would not be).
    expect(facts.lastAnaesthesia).toEqual({
      at: '2025-06-10T12:00:00.000Z', agent, concentrationMgL: 120, recoveryMinutes: 31, longRecovery: true, entryId: slow.anaesthesia!.id,
    })
    expect(facts.anaesthesiaHistory).toEqual({ count: 2, longRecoveries: 2, lastWaterTemperatureC: 19, lastInductionMinutes: 4 })
    const quick = await addEntry(world.vet.client, fish.id, { kind: 'anaesthesia', occurredAt: daysAgo(1), data: { agent: 'Eugenol (clove oil)', concentrationMgL: 40, recoveryMinutes: 30 } })
    const later = (await world.owner.client.get(`/api/fish/${fish.id}/facts`)).body
    expect(later.lastAnaesthesia).toMatchObject({ entryId: quick.entry.id, recoveryMinutes: 30, longRecovery: false })
    expect(later.anaesthesiaHistory.longRecoveries).toBe(2)
  })

  it('shows two enucleations as no eyes, and refuses to remove a removed eye', async () => {
    const fish = await createFish(world.owner.client, world.pond.id, { name: 'Two-eyes' })
    const facts = async () => (await world.keeper.client.get(`/api/fish/${fish.id}/facts`)).body
    expect((await facts()).eyes).toEqual({ left: null, right: null, summary: '' })

    const left = await addEntry(world.vet.client, fish.id, enucleation('2023-04-18', 'left'))
    expect((await facts()).eyes.summary).toBe('left eye removed 2023-04-18 — right eye only')
    const again = await world.vet.client.post(`/api/fish/${fish.id}/timeline`, enucleation('2024-01-10', 'left'))
    expect(again.status).toBe(400)
    expect(again.body.data.fieldErrors['data.side']).toEqual(['The left eye was already removed on 2023-04-18: it cannot be removed again'])
    const both = await world.vet.client.post(`/api/fish/${fish.id}/timeline`, enucleation('2024-01-10', 'both'))
    expect(both.body.data.fieldErrors['data.side'][0]).toMatch(/^The left eye was already removed on 2023-04-18/)

    await addEntry(world.vet.client, fish.id, enucleation('2026-05-02', 'right'))
    const after = await facts()
    expect(after.eyes.summary).toBe('left eye removed 2023-04-18; right eye removed 2026-05-02 — no eyes')
    expect(after.eyes.left.entryId).toBe(left.entry.id)
    const third = await world.vet.client.post(`/api/fish/${fish.id}/timeline`, enucleation('2026-06-01', 'right'))
    expect(third.body.data.fieldErrors['data.side']).toEqual(['The right eye was already removed on 2026-05-02: it cannot be removed again'])

    // Marking the first one entered in error gives the left eye back, so it may be recorded again.
    await world.vet.client.post(`/api/timeline/${left.entry.id}/entered-in-error`, { reason: 'Recorded on the wrong fish' })
    expect((await facts()).eyes.summary).toBe('right eye removed 2026-05-02 — left eye only')
    await addEntry(world.vet.client, fish.id, enucleation('2026-06-01', 'left'))
  })

  it('does not let an amendment remove an eye twice either', async () => {
    const fish = await createFish(world.owner.client, world.pond.id, { name: 'Amended' })
    await addEntry(world.vet.client, fish.id, enucleation('2022-03-01', 'right'))
    const trim = await addEntry(world.vet.client, fish.id, { kind: 'procedure', occurredAt: '2023-03-01', data: { code: 'fin_trim', side: 'not_applicable', performedBy: 'Dr Vet' } })
    const response = await world.vet.client.post(`/api/timeline/${trim.entry.id}/amend`, { revision: 1, data: { code: 'enucleation', side: 'right', performedBy: 'Dr Vet' }, reason: 'Wrong procedure' })
    expect(response.status).toBe(400)
    expect(response.body.data.fieldErrors['data.side'][0]).toMatch(/right eye was already removed on 2022-03-01/)
    // Amending the enucleation itself (a better outcome note) is no second removal.
    const own = (await world.vet.client.get(`/api/fish/${fish.id}/facts`)).body.eyes.right.entryId
    expect((await world.vet.client.post(`/api/timeline/${own}/amend`, { revision: 1, data: { code: 'enucleation', side: 'right', performedBy: 'Dr Vet', outcome: 'Healed well' }, reason: 'Outcome added' })).status).toBe(200)
  })

  it('lists active and suspected problems, current treatments, the latest weight, the last exam and the death', async () => {
    const fish = await createFish(world.owner.client, world.pond.id, { name: 'Busy' })
    const samples = sampleEntries(fish.id)
    await addEntry(world.keeper.client, fish.id, { kind: 'measurement', occurredAt: daysAgo(30), data: { weightG: 900, lengthCm: 38 } })
    const latest = await addEntry(world.keeper.client, fish.id, { kind: 'measurement', occurredAt: daysAgo(3), data: { weightG: 950 } })
    await addEntry(world.keeper.client, fish.id, { kind: 'measurement', occurredAt: daysAgo(2), data: { lengthCm: 38.5, lengthType: 'fork' } })
    const active = await addEntry(world.vet.client, fish.id, samples.problemActive)
    const suspected = await addEntry(world.keeper.client, fish.id, samples.problemSuspected)
    await addEntry(world.vet.client, fish.id, { kind: 'problem', occurredAt: daysAgo(100), data: { name: 'Fin rot', onset: daysAgo(120), status: 'resolved', resolvedOn: daysAgo(90) } })
    const running = await addEntry(world.vet.client, fish.id, { kind: 'treatment', occurredAt: daysAgo(5), data: { drug: 'Salt (sodium chloride)', route: 'pond_immersion', dose: 3, doseUnit: 'g/L', startOn: daysAgo(5), durationDays: 6 } })
    // A 5-day course that started 5 days ago ended yesterday (its last day is day 5).
    await addEntry(world.vet.client, fish.id, { kind: 'treatment', occurredAt: daysAgo(5), data: { drug: 'Course A', route: 'in_feed', dose: 50, doseUnit: 'mg/kg', startOn: daysAgo(5), durationDays: 5 } })
    await addEntry(world.vet.client, fish.id, { kind: 'treatment', occurredAt: daysAgo(50), data: { drug: 'Old dip', route: 'dip', exposureMinutes: 30, dose: 10, doseUnit: 'mg/L', startOn: daysAgo(50), endOn: daysAgo(49) } })
    const open = await addEntry(world.keeper.client, fish.id, { kind: 'treatment', occurredAt: daysAgo(1), data: { drug: 'Wound gel', route: 'topical', dose: 1, doseUnit: 'per fish', startOn: daysAgo(1), instructedById: world.vet.user.id } })
    await addEntry(world.vet.client, fish.id, { ...samples.exam, occurredAt: daysAgo(40), data: { ...samples.exam.data, reason: 'Older check' } })
    const exam = await addEntry(world.vet.client, fish.id, samples.exam)

    const facts = (await world.owner.client.get(`/api/fish/${fish.id}/facts`)).body
    expect(facts.problems.map((p: { entryId: string, status: string }) => [p.entryId, p.status])).toEqual([[active.entry.id, 'active'], [suspected.entry.id, 'suspected']])
    expect(facts.treatments.map((t: { entryId: string }) => t.entryId).sort()).toEqual([running.entry.id, open.entry.id].sort())
    expect(facts.treatments.find((t: { entryId: string }) => t.entryId === running.entry.id).lastDay).toBe(daysAgo(0))
    // Who prescribed each: the vet who wrote it, or the vet of the pond the keeper named.
    expect(facts.treatments.map((t: { entryId: string, prescribedBy: string }) => [t.entryId, t.prescribedBy]).sort())
      .toEqual([[running.entry.id, 'Vet'], [open.entry.id, 'Vet']].sort())
    expect(facts.latestWeight).toMatchObject({ weightG: 950, entryId: latest.entry.id })
    expect(facts.latestWeight.at.slice(0, 10)).toBe(daysAgo(3))
    expect(facts.latestLength).toMatchObject({ lengthCm: 38.5, lengthType: 'fork' })
    expect(facts.lastExam).toMatchObject({ entryId: exam.entry.id, by: 'Vet', reason: 'Spring health check' })
    expect(facts.death).toBeNull()

    // Resolving the problem by amendment takes it off the list.
    await world.vet.client.post(`/api/timeline/${active.entry.id}/amend`, { revision: 1, data: { ...samples.problemActive.data, status: 'resolved', resolvedOn: daysAgo(0) }, reason: 'Clear on the recheck scrape' })
    const death = await addEntry(world.vet.client, fish.id, samples.death)
    const later = (await world.owner.client.get(`/api/fish/${fish.id}/facts`)).body
    expect(later.problems.map((p: { entryId: string }) => p.entryId)).toEqual([suspected.entry.id])
    expect(later.death).toMatchObject({ entryId: death.entry.id, cause: 'Old age' })
  })

  it('shows a companion on both profiles, worded from each side', async () => {
    const guide = await createFish(world.owner.client, world.pond.id, { name: 'Clem' })
    const blind = await createFish(world.owner.client, world.pond.id, { name: 'Pilo' })
    const note = await addEntry(world.keeper.client, guide.id, { kind: 'companion', occurredAt: daysAgo(3), data: { relatedFishId: blind.id, relation: 'leads', note: 'Swims just ahead at feeding' } })
    const guideFacts = (await world.vet.client.get(`/api/fish/${guide.id}/facts`)).body
    const blindFacts = (await world.vet.client.get(`/api/fish/${blind.id}/facts`)).body
    expect(guideFacts.companions).toEqual([{ entryId: note.entry.id, fish: { id: blind.id, name: 'Pilo' }, relation: 'leads', words: 'leads' }])
    expect(blindFacts.companions).toEqual([{ entryId: note.entry.id, fish: { id: guide.id, name: 'Clem' }, relation: 'leads', words: 'follows' }])
    // On both timelines too; only the side it was written on offers to amend it.
    const onBlind = (await world.keeper.client.get(`/api/fish/${blind.id}/timeline`)).body.entries
    expect(onBlind).toHaveLength(1)
    expect(onBlind[0]).toMatchObject({ id: note.entry.id, viewpoint: 'related', otherFish: { id: guide.id, name: 'Clem' }, canAmend: false })
    const onGuide = (await world.keeper.client.get(`/api/fish/${guide.id}/timeline`)).body.entries
    expect(onGuide[0]).toMatchObject({ viewpoint: 'subject', otherFish: { id: blind.id, name: 'Pilo' }, canAmend: true })

    // The guide's death is marked on the blind fish's growth chart.
    await addEntry(world.owner.client, guide.id, { kind: 'death', occurredAt: daysAgo(1), data: { cause: '' } })
    const growth = (await world.vet.client.get(`/api/fish/${blind.id}/growth`)).body
    expect(growth.markers).toEqual([expect.objectContaining({ kind: 'companion_death', label: 'Clem died' })])
  })
})

describe('entries of an earlier form', () => {
  it('are brought to the current form once, as a new revision, and keep their eye fact', async () => {
    const fish = await createFish(world.owner.client, world.pond.id, { name: 'Old record' })
    // Written the way the app stored a procedure before codes: a name and a surgeon.
    const legacy = { name: 'Enucleation', bodySite: 'eye', side: 'right', surgeon: 'Dr Vet' }
    const { rows: [entry] } = await testDb().query(`insert into timeline_entries (fish_id, pond_id, kind, occurred_at, author_id, data)
      values ($1, $2, 'procedure', '2021-04-01T12:00:00Z', $3, $4) returning id`, [fish.id, world.pond.id, world.vet.user.id, legacy])
    await testDb().query(`insert into timeline_revisions (entry_id, revision, occurred_at, data, author_id) values ($1, 1, '2021-04-01T12:00:00Z', $2, $3)`, [entry.id, legacy, world.vet.user.id])
    expect((await world.vet.client.get(`/api/fish/${fish.id}/facts`)).body.eyes.right).toBeNull()

    const db = drizzle(testDb())
    expect(await upgradeLegacyEntries(db, sql`e.fish_id = ${fish.id}`)).toBe(1)
    expect(await upgradeLegacyEntries(db, sql`e.fish_id = ${fish.id}`)).toBe(0)
    const facts = (await world.vet.client.get(`/api/fish/${fish.id}/facts`)).body
    expect(facts.eyes.right).toEqual({ on: '2021-04-01', entryId: entry.id })
    const revisions = (await world.vet.client.get(`/api/timeline/${entry.id}/revisions`)).body
    expect(revisions.map((r: { revision: number }) => r.revision).sort()).toEqual([1, 2])
    const latest = revisions.find((r: { revision: number }) => r.revision === 2)
    expect(latest.data).toEqual({ code: 'enucleation', name: 'Enucleation', bodySite: 'eye', side: 'right', performedBy: 'Dr Vet' })
    expect(latest.reason).toMatch(/current record form/)
  })
})
