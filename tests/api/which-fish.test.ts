import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { ApiClient } from '../support/client'
import { closeTestDb, testDb } from '../support/db'
import { MAIN_URL } from '../support/env'
import { createFish, pondWithRoles } from '../support/factories'
import { tusUpload } from '../support/photos'
import { benchFish, referenceShots, renderShot, rotatedCroppedDarker } from '../../scripts/bench/which-fish-set'

let world: Awaited<ReturnType<typeof pondWithRoles>>

beforeAll(async () => {
  world = await pondWithRoles()
})
afterAll(closeTestDb)

/** The route takes multipart form data, as the page's file input sends it. */
async function identify(client: ApiClient, pondId: string, bytes: Buffer, type = 'image/jpeg', name = 'new.jpg') {
  const form = new FormData()
  form.append('photo', new Blob([new Uint8Array(bytes)], { type }), name)
  const response = await fetch(`${MAIN_URL}/api/ponds/${pondId}/identify`, { method: 'POST', body: form, headers: client.cookies.size ? { cookie: client.cookieHeader() } : {} })
  return { status: response.status, body: await response.json() }
}

describe('POST /api/ponds/:pondId/identify', () => {
  it('answers a pond with no reference photos with no candidates and the reason', async () => {
    const picture = await renderShot(benchFish(1)[0]!, referenceShots(benchFish(1)[0]!, 1)[0]!)
    const result = await identify(world.keeper.client, world.pond.id, picture)
    expect(result.status).toBe(200)
    expect(result.body).toMatchObject({ candidates: [], referenceCount: 0 })
    expect(result.body.reason).toMatch(/from above/)
  })

  it('is there for every member and does not exist for anyone else', async () => {
    const picture = await renderShot(benchFish(1)[0]!, referenceShots(benchFish(1)[0]!, 1)[0]!)
    for (const who of ['owner', 'keeper', 'vet'] as const) expect((await identify(world[who].client, world.pond.id, picture)).status, who).toBe(200)
    expect((await identify(world.outsider.client, world.pond.id, picture)).status).toBe(404)
    expect((await identify(world.anonymous.client, world.pond.id, picture)).status).toBe(401)
    expect((await identify(world.owner.client, '00000000-0000-4000-8000-000000000000', picture)).status).toBe(404)
  })

  it('refuses a file that is not an image with 415, and a request without a photo with 400', async () => {
    const pdf = Buffer.concat([Buffer.from('%PDF-1.4\n'), Buffer.alloc(2000, 32)])
    const refused = await identify(world.owner.client, world.pond.id, pdf, 'application/pdf', 'scan.pdf')
    expect(refused.status).toBe(415)
    expect(refused.body.data.fieldErrors.photo[0]).toMatch(/PDF/)
    const text = await identify(world.owner.client, world.pond.id, Buffer.from('just some words about a fish\n'), 'text/plain', 'notes.txt')
    expect(text.status).toBe(415)
    const empty = await fetch(`${MAIN_URL}/api/ponds/${world.pond.id}/identify`, { method: 'POST', body: new FormData(), headers: { cookie: world.owner.client.cookieHeader() } })
    expect(empty.status).toBe(400)
  })

  it('finds a generated fish again from a rotated, cropped, darker photo among look-alikes', { timeout: 240_000 }, async () => {
    // Four fish drawn by the seed's pattern generator, two of them a look-alike pair; three photos from above each.
    const drawn = benchFish(4)
    const pond = (await world.owner.client.post('/api/ponds', { name: 'Which fish pond', volumeLitres: 9000 })).body as { id: string }
    const ids: string[] = []
    for (const [i, fish] of drawn.entries()) {
      const row = await createFish(world.owner.client, pond.id, { name: `Drawn ${i + 1}`, variety: fish.pattern.variety, species: fish.pattern.species })
      ids.push(row.id)
      for (const [j, shot] of referenceShots(fish, 3).entries()) {
        const { done } = tusUpload(MAIN_URL, world.owner.client, await renderShot(fish, shot), { metadata: { fishId: row.id, filename: `ref-${j}.jpg`, view: 'top' } })
        expect((await done).headers['photo-state']).toBe('ready')
      }
    }
    const target = 1
    const result = await identify(world.owner.client, pond.id, await renderShot(drawn[target]!, rotatedCroppedDarker(drawn[target]!)))
    expect(result.status).toBe(200)
    expect(result.body.referenceCount).toBe(12)
    expect(result.body.candidates[0]).toMatchObject({ fishId: ids[target], name: `Drawn ${target + 1}`, variety: drawn[target]!.pattern.variety })
    expect(result.body.candidates.length).toBeLessThanOrEqual(5)
    const scores = result.body.candidates.map((c: { score: number }) => c.score)
    expect([...scores].sort((a: number, b: number) => b - a)).toEqual(scores)
    for (const score of scores) {
      expect(score).toBeGreaterThanOrEqual(0)
      expect(score).toBeLessThanOrEqual(1)
    }
    // The best candidate's reference photo is one of that fish's own photos.
    const { rows } = await testDb().query('select fish_id from photos where id = $1', [result.body.candidates[0].referencePhotoId])
    expect(rows[0].fish_id).toBe(ids[target])
    // Features were stored once per reference photo, not recomputed for every question.
    const stored = await testDb().query('select count(*)::int as n from photo_features f join photos p on p.id = f.photo_id where p.fish_id = any($1)', [ids])
    expect(stored.rows[0].n).toBe(12)
  })
})
