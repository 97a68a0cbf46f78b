import { afterAll, describe, expect, it } from 'vitest'
import { closeTestDb } from '../support/db'
import { addMember, createFish, pondWithRoles, signedInUser } from '../support/factories'
import { waitForMail, type StoredMail } from '../support/mail'
import { testEnv } from '../support/env'

afterAll(closeTestDb)

const daysAgo = (n: number) => new Date(Date.now() - n * 86_400_000).toISOString().slice(0, 10)

async function mailsTo(email: string): Promise<StoredMail[]> {
  const response = await fetch(`${testEnv().inboxUrl}/api/messages?to=${encodeURIComponent(email)}`)
  return (await response.json()) as StoredMail[]
}

describe('a vet visit', () => {
  it('links what the vet records while it is open, and mails its summary to the owner and keepers only when closed', async () => {
    const { owner, keeper, vet, outsider, pond, fish } = await pondWithRoles()
    const other = await createFish(owner.client, pond.id, { name: 'Not seen' })
    const secondVet = await signedInUser({ name: 'Second vet' })
    await addMember(pond.id, secondVet.user.id, 'vet')

    // Before the visit: not linked.
    const before = await vet.client.post(`/api/fish/${fish.id}/timeline`, { kind: 'observation', occurredAt: daysAgo(1), data: { signs: ['flashing'] } })
    expect(before.status).toBe(201)

    expect((await keeper.client.post(`/api/ponds/${pond.id}/visits`, { visitedOn: daysAgo(0), purpose: 'sick_call' })).status).toBe(403)
    expect((await outsider.client.post(`/api/ponds/${pond.id}/visits`, { visitedOn: daysAgo(0), purpose: 'sick_call' })).status).toBe(404)
    const bad = await vet.client.post(`/api/ponds/${pond.id}/visits`, { visitedOn: 'tomorrow', purpose: 'picnic' })
    expect(bad.status).toBe(400)
    expect(Object.keys(bad.body.data.fieldErrors).sort()).toEqual(['purpose', 'visitedOn'])

    const opened = await vet.client.post(`/api/ponds/${pond.id}/visits`, { visitedOn: daysAgo(0), purpose: 'sick_call', fishSeen: [fish.id] })
    expect(opened.status, JSON.stringify(opened.body)).toBe(201)
    const visitId = opened.body.visit.id as string
    expect((await vet.client.post(`/api/ponds/${pond.id}/visits`, { visitedOn: daysAgo(0), purpose: 'follow_up' })).status).toBe(409)

    const scrape = await vet.client.post(`/api/fish/${fish.id}/timeline`, {
      kind: 'lab_result', occurredAt: new Date().toISOString(),
      data: { panel: 'skin_scrape', organisms: [{ name: 'Trichodina', count: '3 per field' }], findings: 'Moderate Trichodina' },
    })
    expect(scrape.status).toBe(201)
    const treated = await vet.client.post(`/api/fish/${fish.id}/timeline`, {
      kind: 'treatment', occurredAt: new Date().toISOString(),
      data: { drug: 'Enrofloxacin', route: 'injection', injectionSite: 'intramuscular', dose: 10, doseUnit: 'mg/kg', startOn: daysAgo(0), durationDays: 5 },
    })
    expect(treated.status, JSON.stringify(treated.body)).toBe(201)
    // Another vet of the pond, and the keeper, write at the same time: not part of this vet's visit.
    const byOtherVet = await secondVet.client.post(`/api/fish/${other.id}/timeline`, { kind: 'observation', occurredAt: new Date().toISOString(), data: { text: 'Second opinion: eating well' } })
    expect(byOtherVet.status).toBe(201)
    const salt = await vet.client.post(`/api/ponds/${pond.id}/events`, { kind: 'salt', occurredAt: new Date().toISOString(), data: { percent: 0.3, amountKg: 15 } })
    expect(salt.status).toBe(201)
    expect(salt.body.event.visitId).toBe(visitId)
    // Nitrite 0.5 mg/L NO2-N is above the 0.1 target and dissolved oxygen 4 mg/L below the 5 mg/L one (defaults from SRAC 464).
    const water = await vet.client.post(`/api/ponds/${pond.id}/water-tests`, { testedAt: new Date().toISOString(), pH: 7.5, temperatureC: 18, nitriteNMgL: 0.5, dissolvedOxygenMgL: 4 })
    expect(water.status, JSON.stringify(water.body)).toBe(201)
    const keeperWater = await keeper.client.post(`/api/ponds/${pond.id}/water-tests`, { testedAt: new Date().toISOString(), pH: 7.4 })
    expect(keeperWater.status).toBe(201)

    // Only the vet who opened it changes it.
    expect((await secondVet.client.patch(`/api/ponds/${pond.id}/visits/${visitId}`, { findings: 'x' })).status).toBe(403)
    expect((await vet.client.patch(`/api/ponds/${pond.id}/visits/${visitId}`, { fishSeen: [fish.id, outsider.user.id] })).status).toBe(400)
    expect((await vet.client.post(`/api/ponds/${pond.id}/visits/${visitId}/close`, { findings: '' })).status).toBe(400)

    const closed = await vet.client.post(`/api/ponds/${pond.id}/visits/${visitId}/close`, { findings: 'Trichodina on the skin scrape; pond salted.' })
    expect(closed.status, JSON.stringify(closed.body)).toBe(200)
    expect(closed.body.mailedTo).toBe(2)
    const summary = closed.body.visit
    expect(summary.fishSeen).toEqual([{ id: fish.id, name: fish.name }])
    expect(summary.entries.map((e: { id: string }) => e.id).sort()).toEqual([scrape.body.entry.id, treated.body.entry.id].sort())
    expect(summary.pondEvents.map((e: { id: string }) => e.id)).toEqual([salt.body.event.id])
    expect(summary.waterTests.map((w: { id: string }) => w.id)).toEqual([water.body.waterTest.id])

    // After closing, nothing more is linked.
    const after = await vet.client.post(`/api/fish/${fish.id}/timeline`, { kind: 'observation', occurredAt: new Date().toISOString(), data: { text: 'Calmer' } })
    expect(after.status).toBe(201)
    expect((await vet.client.get(`/api/ponds/${pond.id}/visits/${visitId}`)).body.visit.entries).toHaveLength(2)

    for (const person of [owner, keeper]) {
      const mail = await waitForMail(person.email, m => m.subject.includes('Sick call'))
      expect(mail.text).toContain('Trichodina on the skin scrape; pond salted.')
      expect(mail.text).toContain(`Fish seen: ${fish.name}`)
      expect(mail.text).toContain(`- ${fish.name}: Lab result: skin scrape: Moderate Trichodina`)
      expect(mail.text).toContain(`- ${fish.name}: Treatment: Enrofloxacin, injection, 10 mg/kg`)
      expect(mail.text).toContain('Salt added to the pond')
      expect(mail.text).toContain('Nitrite 0.50 mg/L NO2-N (HIGH)')
      expect(mail.text).toContain('Dissolved oxygen 4.0 mg/L (LOW)')
      expect(mail.text).toContain('pH 7.5,')
      expect(mail.text).not.toContain('Second opinion')
      expect(mail.text).not.toContain('Calmer')
      expect(mail.text).toContain(`/ponds/${pond.id}/visits/${visitId}`)
    }
    await new Promise(r => setTimeout(r, 500))
    for (const person of [vet, secondVet, outsider]) {
      expect((await mailsTo(person.email)).filter(m => m.subject.includes('Sick call'))).toEqual([])
    }
    // Members open the summary; nobody else does.
    expect((await keeper.client.get(`/api/ponds/${pond.id}/visits/${visitId}`)).status).toBe(200)
    expect((await outsider.client.get(`/api/ponds/${pond.id}/visits/${visitId}`)).status).toBe(404)
    expect((await vet.client.post(`/api/ponds/${pond.id}/visits/${visitId}/close`, { findings: 'again' })).status).toBe(409)
  })
})
