import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { closeTestDb } from '../support/db'
import { insertReadyPhoto } from '../support/custody'
import { createFish, pondWithRoles } from '../support/factories'
import { addEntry, daysAgo, sampleEntries } from '../support/timeline'

afterAll(closeTestDb)

// The profile and pond pages' server render asks one page route for every part the page opens with; the browser
// asks each part's own route afterwards (navigation, refresh after a write). Both must give the same answer to the
// same person, and the page route must refuse exactly as the parts' routes do.
let world: Awaited<ReturnType<typeof pondWithRoles>>

beforeAll(async () => {
  world = await pondWithRoles()
  const friend = await createFish(world.owner.client, world.pond.id, { name: 'Friend' })
  const entries = sampleEntries(friend.id, world.vet.user.id)
  for (const kind of ['measurement', 'exam', 'problemActive', 'procedure', 'anaesthesia', 'treatmentPrescribed', 'companion'] as const) {
    await addEntry(world.vet.client, world.fish.id, entries[kind])
  }
  await insertReadyPhoto(world.fish.id, world.keeper.user.id, `${daysAgo(3)}T10:00:00Z`)
  expect((await world.vet.client.post(`/api/ponds/${world.pond.id}/visits`, { visitedOn: daysAgo(0), purpose: 'health_check' })).status).toBe(201)
})

describe('page routes', () => {
  it('give each member of the pond the fish profile\'s parts exactly as the parts\' own routes do', async () => {
    for (const person of [world.owner, world.keeper, world.vet]) {
      const fishUrl = `/api/fish/${world.fish.id}`
      const page = await person.client.get(`${fishUrl}/page?limit=20`)
      expect(page.status).toBe(200)
      const parts = {
        fish: (await person.client.get(fishUrl)).body,
        facts: (await person.client.get(`${fishUrl}/facts`)).body,
        timeline: (await person.client.get(`${fishUrl}/timeline?limit=20`)).body,
        residences: (await person.client.get(`${fishUrl}/residences`)).body,
        photos: (await person.client.get(`${fishUrl}/photos`)).body,
      }
      expect(page.body).toEqual(parts)
      // Not empty answers that happen to agree: what was written above is there (the seven entries and the photo).
      expect(page.body.timeline.entries).toHaveLength(8)
      expect(page.body.photos.photos).toHaveLength(1)
      expect(page.body.facts.problems).toHaveLength(1)
    }
  })

  it('give each member the pond page\'s parts exactly as the parts\' own routes do', async () => {
    for (const person of [world.owner, world.keeper, world.vet]) {
      const pondUrl = `/api/ponds/${world.pond.id}`
      const page = await person.client.get(`${pondUrl}/page`)
      expect(page.status).toBe(200)
      const parts = {
        pond: (await person.client.get(pondUrl)).body,
        fish: (await person.client.get(`${pondUrl}/fish`)).body,
      }
      // Exactly these two: what is due, the visits and the events load when scrolled to, from their own routes.
      expect(page.body).toEqual(parts)
      expect(page.body.fish).toHaveLength(2)
      expect(page.body.pond.id).toBe(world.pond.id)
    }
  })

  it('refuse as the parts do: 404 to a non-member, 401 when signed out, 400 for a bad query', async () => {
    for (const url of [`/api/fish/${world.fish.id}/page`, `/api/ponds/${world.pond.id}/page`]) {
      expect((await world.outsider.client.get(url)).status).toBe(404)
      expect((await world.anonymous.client.get(url)).status).toBe(401)
    }
    expect((await world.owner.client.get(`/api/fish/${world.fish.id}/page?limit=0`)).status).toBe(400)
    expect((await world.owner.client.get('/api/fish/not-a-fish/page')).status).toBe(404)
  })
})
