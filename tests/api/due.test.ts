import { afterAll, describe, expect, it } from 'vitest'
import type { ApiClient } from '../support/client'
import { closeTestDb, testDb } from '../support/db'
import { createFish, createPond, pondWithRoles, signedInUser } from '../support/factories'
import { fixedClock, MAIN_URL, testEnv } from '../support/env'
import { waitForMail, type StoredMail } from '../support/mail'

afterAll(closeTestDb)

async function mailsTo(email: string): Promise<StoredMail[]> {
  const response = await fetch(`${testEnv().inboxUrl}/api/messages?to=${encodeURIComponent(email)}`)
  return (await response.json()) as StoredMail[]
}

// The clock the due lists are worked out for; entries are dated before it so none is "in the future".
const NOW = '2026-06-10T09:00:00.000Z'
const TODAY = '2026-06-10'
const TOMORROW = '2026-06-11'

async function dueAt(client: ApiClient, now = NOW) {
  const response = await client.get('/api/due', fixedClock(now))
  expect(response.status, JSON.stringify(response.body)).toBe(200)
  return response.body.items as Record<string, unknown>[]
}

async function procedureWithRecheck(vet: ApiClient, fishId: string, occurredAt: string, recheckOn: string) {
  const response = await vet.post(`/api/fish/${fishId}/timeline`, {
    kind: 'procedure', occurredAt, data: { code: 'mass_removal', name: 'Mass removal', bodySite: 'flank', side: 'left', performedBy: 'Dr Test', recheckOn },
  })
  expect(response.status, JSON.stringify(response.body)).toBe(201)
  return response.body.entry.id as string
}

async function setCreated(pondId: string, day: string) {
  await testDb().query('update ponds set created_at = $2 where id = $1', [pondId, `${day}T08:00:00Z`])
}

describe('what is due', () => {
  it('lists a recheck due tomorrow, drops it once an exam follows, and shows an overdue water test and the spring check', async () => {
    const { owner, vet, pond, fish } = await pondWithRoles()
    await setCreated(pond.id, '2026-05-01')
    expect((await owner.client.patch(`/api/ponds/${pond.id}`, { waterTestIntervalDays: 14 })).status).toBe(200)
    const done = await createFish(owner.client, pond.id, { name: 'Rechecked' })
    await procedureWithRecheck(vet.client, fish.id, '2026-05-28', TOMORROW)
    await procedureWithRecheck(vet.client, done.id, '2026-05-28', TOMORROW)
    // The recheck of the second fish has been done: an exam on a later day than the procedure.
    expect((await vet.client.post(`/api/fish/${done.id}/timeline`, { kind: 'exam', occurredAt: '2026-06-09', data: { reason: 'Recheck', assessment: 'Healing well' } })).status).toBe(201)

    const items = (await dueAt(vet.client)).filter(i => i.pondId === pond.id)
    expect(items).toEqual([
      // Pond added 1 May, no water test since, every 14 days: due 15 May, overdue on 10 June.
      { pondId: pond.id, pondName: pond.name, kind: 'water_test', dueOn: '2026-05-15', overdue: true },
      { pondId: pond.id, pondName: pond.name, fishId: fish.id, kind: 'recheck', dueOn: TOMORROW, overdue: false },
    ])
    // Every item has exactly the documented fields.
    for (const item of items) expect(Object.keys(item).sort()).toEqual(item.fishId ? ['dueOn', 'fishId', 'kind', 'overdue', 'pondId', 'pondName'] : ['dueOn', 'kind', 'overdue', 'pondId', 'pondName'])

    // A water test on 5 June moves the next one to 19 June (every 14 days), overdue from 20 June.
    expect((await owner.client.post(`/api/ponds/${pond.id}/water-tests`, { testedAt: '2026-06-05T08:00:00Z', pH: 7.6 })).status).toBe(201)
    expect((await dueAt(vet.client)).filter(i => i.pondId === pond.id && i.kind === 'water_test')).toEqual([
      { pondId: pond.id, pondName: pond.name, kind: 'water_test', dueOn: '2026-06-19', overdue: false },
    ])
    expect((await dueAt(vet.client, '2026-06-25T09:00:00Z')).filter(i => i.pondId === pond.id && i.kind === 'water_test')).toEqual([
      { pondId: pond.id, pondName: pond.name, kind: 'water_test', dueOn: '2026-06-19', overdue: true },
    ])

    // The pond page shows everything, however far ahead: the next spring check (1 April 2027, the pond was added after this year's).
    const pondDue = await owner.client.get(`/api/ponds/${pond.id}/due`, fixedClock(NOW))
    expect(pondDue.body.items.map((i: { kind: string, dueOn: string }) => [i.kind, i.dueOn])).toEqual([
      ['recheck', TOMORROW], ['water_test', '2026-06-19'], ['health_check', '2027-04-01'],
    ])
  })

  it('lists the next dose of a scheduled course and the recheck set on the treatment', async () => {
    const { vet, pond, fish } = await pondWithRoles()
    await setCreated(pond.id, '2026-05-01')
    // Three doses 24 hours apart from 9 June 08:00: at 10 June 09:00 dose 1 is given, dose 2 (10 June 08:00) has
    // passed without being recorded (missed), dose 3 is due on 11 June 08:00.
    const course = await vet.client.post(`/api/fish/${fish.id}/timeline`, {
      kind: 'treatment', occurredAt: '2026-06-09T08:00:00Z',
      data: { drug: 'Enrofloxacin', route: 'injection', injectionSite: 'intramuscular', dose: 10, doseUnit: 'mg/kg', startOn: '2026-06-09', doseCount: 3, intervalHours: 24, firstDoseAt: '2026-06-09T08:00:00Z', recheckOn: '2026-06-20' },
    })
    expect(course.status, JSON.stringify(course.body)).toBe(201)
    expect((await vet.client.post(`/api/timeline/${course.body.entry.id}/doses`, { doseNumber: 1, givenAt: '2026-06-09T08:05:00Z' })).status).toBe(201)
    const ofFish = (await dueAt(vet.client)).filter(i => i.fishId === fish.id)
    expect(ofFish).toEqual([
      { pondId: pond.id, pondName: pond.name, fishId: fish.id, kind: 'treatment_dose', dueOn: '2026-06-11', overdue: false },
      { pondId: pond.id, pondName: pond.name, fishId: fish.id, kind: 'recheck', dueOn: '2026-06-20', overdue: false },
    ])
    const worklist = await vet.client.get('/api/due/worklist', fixedClock(NOW))
    expect(worklist.body.items.find((i: { kind: string }) => i.kind === 'treatment_dose').about).toBe('dose 3 of 3 of Enrofloxacin, 1 missed')
    // Once the last dose is given the course leaves the list.
    expect((await vet.client.post(`/api/timeline/${course.body.entry.id}/doses`, { doseNumber: 3, givenAt: '2026-06-10T08:30:00Z' })).status).toBe(201)
    expect((await dueAt(vet.client)).filter(i => i.fishId === fish.id).map(i => i.kind)).toEqual(['recheck'])
  })

  it('moves the spring check with the pond setting and a routine visit', async () => {
    const { owner, vet, pond } = await pondWithRoles()
    await setCreated(pond.id, '2025-01-10')
    const kindsDue = async () => (await dueAt(owner.client)).filter(i => i.pondId === pond.id).map(i => [i.kind, i.dueOn, i.overdue])
    // No check since the pond was added in January 2025: the 1 April 2025 check is overdue.
    expect(await kindsDue()).toContainEqual(['health_check', '2025-04-01', true])
    expect((await owner.client.patch(`/api/ponds/${pond.id}`, { healthCheckDay: '02-30' })).status).toBe(400)
    expect((await owner.client.patch(`/api/ponds/${pond.id}`, { healthCheckDay: '05-15' })).status).toBe(200)
    expect(await kindsDue()).toContainEqual(['health_check', '2025-05-15', true])
    const visit = await vet.client.post(`/api/ponds/${pond.id}/visits`, { visitedOn: '2026-05-20', purpose: 'health_check' })
    expect(visit.status, JSON.stringify(visit.body)).toBe(201)
    // Checked on 20 May 2026: the next is 15 May 2027, beyond the list's two weeks.
    expect((await kindsDue()).filter(([kind]) => kind === 'health_check')).toEqual([])
  })

  it('answers only for the ponds the person belongs to', async () => {
    const { owner, pond } = await pondWithRoles()
    const stranger = await signedInUser({ name: 'Stranger' })
    const theirs = await createPond(stranger.client, { name: 'Stranger pond' })
    await setCreated(theirs.id, '2026-01-01')
    await setCreated(pond.id, '2026-01-01')
    const ownerItems = await dueAt(owner.client)
    expect(ownerItems.length).toBeGreaterThan(0)
    expect(ownerItems.every(i => i.pondId === pond.id)).toBe(true)
    expect((await dueAt(stranger.client)).map(i => i.pondId)).toEqual([theirs.id, theirs.id])
    expect((await fetch(`${MAIN_URL}/api/due`)).status).toBe(401)
    // The clock header without the test secret is ignored: the real clock is used.
    const unclocked = await stranger.client.get('/api/due', { 'x-fintrail-test-now': '2000-01-01T00:00:00Z' })
    expect(unclocked.body.items.find((i: { kind: string }) => i.kind === 'water_test').overdue).toBe(true)
  })
})

describe('the daily digest', () => {
  it('mails each person what is due on the job clock, once a day, unless they turned it off', async () => {
    const { owner, keeper, vet, pond, fish } = await pondWithRoles()
    await setCreated(pond.id, '2026-05-01')
    await procedureWithRecheck(vet.client, fish.id, '2026-05-28', TOMORROW)
    expect((await keeper.client.patch('/api/me/due-digest', { dueDigest: false })).status).toBe(200)
    expect((await keeper.client.get('/api/me/due-digest')).body).toEqual({ dueDigest: false })
    expect((await keeper.client.patch('/api/me/due-digest', { dueDigest: 'no' })).status).toBe(400)

    // The test route is closed without the secret.
    expect((await owner.client.post('/api/test/due-digest', {})).status).toBe(404)
    // The job the daily schedule sends, run by the pg-boss worker with the test's clock.
    const { rows: schedules } = await testDb().query(`select cron, timezone from pgboss.schedule where name = 'due-digest'`)
    expect(schedules).toEqual([{ cron: '0 6 * * *', timezone: 'UTC' }])
    const run = await owner.client.post('/api/test/due-digest', {}, fixedClock(NOW))
    expect(run.status, JSON.stringify(run.body)).toBe(202)
    for (const person of [owner, vet]) {
      const mail = await waitForMail(person.email, m => m.subject.startsWith('Due in your ponds'))
      expect(mail.text).toContain(pond.name)
      expect(mail.text).toMatch(new RegExp(`11 Jun 2026: Recheck for ${fish.name}`))
      expect(mail.text).toContain('8 May 2026 (overdue): Water test')
    }
    // A second run on the same day sends nothing more to them.
    expect((await owner.client.post('/api/test/due-digest', {}, fixedClock(NOW))).status).toBe(202)
    const { rows } = await testDb().query('select user_id from due_digests where day = $1 and user_id = any($2)', [TODAY, [owner.user.id, keeper.user.id, vet.user.id]])
    expect(rows.map(r => r.user_id).sort()).toEqual([owner.user.id, vet.user.id].sort())
    // Long enough for the second job to have run and its mail (if any) to have been delivered.
    await new Promise(r => setTimeout(r, 5000))
    expect((await mailsTo(owner.email)).filter(m => m.subject.startsWith('Due in your ponds'))).toHaveLength(1)
    expect((await mailsTo(keeper.email)).filter(m => m.subject.startsWith('Due in your ponds'))).toEqual([])
  })
})
