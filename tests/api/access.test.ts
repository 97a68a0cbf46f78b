import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { randomUUID } from 'node:crypto'
import { closeTestDb, testDb } from '../support/db'
import { addMember, pondWithRoles, signedInUser, testMicrochip } from '../support/factories'
import { insertReadyPhoto } from '../support/custody'
import { addEntry } from '../support/timeline'
import type { ApiClient } from '../support/client'

afterAll(closeTestDb)

type Roles = Awaited<ReturnType<typeof pondWithRoles>>
type Who = 'owner' | 'keeper' | 'vet' | 'outsider' | 'anonymous'
let world: Roles

beforeAll(async () => {
  world = await pondWithRoles()
})

const client = (who: Who): ApiClient => world[who].client

// Every route of the foundation with the exact status each kind of caller gets.
const matrix: { route: string, call: (c: ApiClient) => Promise<{ status: number }>, expected: Record<Who, number> }[] = [
  { route: 'GET /api/ponds', call: c => c.get('/api/ponds'), expected: { owner: 200, keeper: 200, vet: 200, outsider: 200, anonymous: 401 } },
  { route: 'POST /api/ponds', call: c => c.post('/api/ponds', { name: 'Matrix pond' }), expected: { owner: 201, keeper: 201, vet: 201, outsider: 201, anonymous: 401 } },
  { route: 'GET /api/ponds/:id', call: c => c.get(`/api/ponds/${world.pond.id}`), expected: { owner: 200, keeper: 200, vet: 200, outsider: 404, anonymous: 401 } },
  { route: 'PATCH /api/ponds/:id', call: c => c.patch(`/api/ponds/${world.pond.id}`, { notes: 'checked' }), expected: { owner: 200, keeper: 403, vet: 403, outsider: 404, anonymous: 401 } },
  { route: 'GET /api/ponds/:id/fish', call: c => c.get(`/api/ponds/${world.pond.id}/fish`), expected: { owner: 200, keeper: 200, vet: 200, outsider: 404, anonymous: 401 } },
  { route: 'POST /api/ponds/:id/fish', call: c => c.post(`/api/ponds/${world.pond.id}/fish`, { name: 'Matrix fish', species: 'goldfish' }), expected: { owner: 201, keeper: 201, vet: 403, outsider: 404, anonymous: 401 } },
  { route: 'GET /api/fish/:id', call: c => c.get(`/api/fish/${world.fish.id}`), expected: { owner: 200, keeper: 200, vet: 200, outsider: 404, anonymous: 401 } },
  { route: 'GET /api/fish/:id/history', call: c => c.get(`/api/fish/${world.fish.id}/history`), expected: { owner: 200, keeper: 200, vet: 200, outsider: 404, anonymous: 401 } },
  { route: 'GET /api/ponds/:id/members', call: c => c.get(`/api/ponds/${world.pond.id}/members`), expected: { owner: 200, keeper: 200, vet: 200, outsider: 404, anonymous: 401 } },
  { route: 'GET /api/ponds/:id/invitations', call: c => c.get(`/api/ponds/${world.pond.id}/invitations`), expected: { owner: 200, keeper: 403, vet: 403, outsider: 404, anonymous: 401 } },
  { route: 'POST /api/ponds/:id/invitations', call: c => c.post(`/api/ponds/${world.pond.id}/invitations`, { email: `matrix-${randomUUID().slice(0, 6)}@test.example`, role: 'keeper' }), expected: { owner: 201, keeper: 403, vet: 403, outsider: 404, anonymous: 401 } },
  { route: 'PATCH /api/ponds/:id/members/:userId', call: c => c.patch(`/api/ponds/${world.pond.id}/members/${world.vet.user.id}`, { role: 'vet' }), expected: { owner: 200, keeper: 403, vet: 403, outsider: 404, anonymous: 401 } },
  { route: 'GET /api/me', call: c => c.get('/api/me'), expected: { owner: 200, keeper: 200, vet: 200, outsider: 200, anonymous: 401 } },
]

describe('role matrix', () => {
  const cases = matrix.flatMap(row => (Object.keys(row.expected) as Who[]).map(who => ({ ...row, who, status: row.expected[who] })))
  it.each(cases)('$route as $who answers $status', async ({ call, who, status }) => {
    expect((await call(client(who))).status).toBe(status)
  })

  it('answers PATCH /api/fish/:id by role, each with the current version', async () => {
    for (const [who, status] of [['owner', 200], ['keeper', 200], ['vet', 200], ['outsider', 404], ['anonymous', 401]] as const) {
      const { rows } = await testDb().query('select version from fish where id = $1', [world.fish.id])
      const response = await client(who).patch(`/api/fish/${world.fish.id}`, { features: `seen by ${who}`, version: rows[0].version })
      expect(response.status, who).toBe(status)
    }
  })
})

describe('not a member means not found', () => {
  it('answers a pond and a fish of another person exactly like ones that do not exist', async () => {
    const hidden = await client('outsider').get(`/api/ponds/${world.pond.id}`)
    const missing = await client('outsider').get(`/api/ponds/${randomUUID()}`)
    expect(hidden.status).toBe(404)
    expect(missing.status).toBe(404)
    expect(hidden.body.statusMessage).toBe(missing.body.statusMessage)
    const hiddenFish = await client('outsider').get(`/api/fish/${world.fish.id}`)
    const missingFish = await client('outsider').get(`/api/fish/${randomUUID()}`)
    expect(hiddenFish.status).toBe(404)
    expect(hiddenFish.body.statusMessage).toBe(missingFish.body.statusMessage)
    expect((await client('owner').get('/api/fish/not-a-uuid')).status).toBe(404)
  })

  it('lists only the ponds the user belongs to, with the role in each', async () => {
    const ponds = (await client('vet').get('/api/ponds')).body as { id: string, role: string, fishCount: number }[]
    const pond = ponds.find(p => p.id === world.pond.id)
    expect(pond).toMatchObject({ role: 'vet' })
    const { rows } = await testDb().query(`select count(*)::int as n from fish where pond_id = $1 and status = 'alive'`, [world.pond.id])
    expect(pond!.fishCount).toBe(rows[0].n)
    expect((await client('keeper').get(`/api/ponds/${world.pond.id}`)).body.fishCount).toBe(rows[0].n)
    const outsiders = (await client('outsider').get('/api/ponds')).body as { id: string }[]
    expect(outsiders.map(p => p.id)).not.toContain(world.pond.id)
  })
})

describe('membership changes take effect on the next request', () => {
  it('refuses a removed member at once, and never removes the last owner', async () => {
    const w = await pondWithRoles()
    expect((await w.keeper.client.get(`/api/fish/${w.fish.id}`)).status).toBe(200)
    expect((await w.owner.client.delete(`/api/ponds/${w.pond.id}/members/${w.keeper.user.id}`)).status).toBe(200)
    expect((await w.keeper.client.get(`/api/fish/${w.fish.id}`)).status).toBe(404)
    expect((await w.keeper.client.get(`/api/ponds/${w.pond.id}`)).status).toBe(404)
    const lastOwner = await w.owner.client.delete(`/api/ponds/${w.pond.id}/members/${w.owner.user.id}`)
    expect(lastOwner.status).toBe(409)
    const demote = await w.owner.client.patch(`/api/ponds/${w.pond.id}/members/${w.owner.user.id}`, { role: 'keeper' })
    expect(demote.status).toBe(409)
  })

  it('applies a role change on the very next request', async () => {
    const w = await pondWithRoles()
    expect((await w.keeper.client.post(`/api/ponds/${w.pond.id}/fish`, { name: 'Before', species: 'koi' })).status).toBe(201)
    await w.owner.client.patch(`/api/ponds/${w.pond.id}/members/${w.keeper.user.id}`, { role: 'vet' })
    expect((await w.keeper.client.post(`/api/ponds/${w.pond.id}/fish`, { name: 'After', species: 'koi' })).status).toBe(403)
  })
})

describe('fish validation', () => {
  it.each([
    ['wrong types', { name: 42, species: 'koi' }, ['name']],
    ['missing fields', {}, ['name', 'species']],
    ['overlong name', { name: 'x'.repeat(81), species: 'koi' }, ['name']],
    ['bad microchip (14 digits)', { name: 'Chip', species: 'koi', microchip: '99912345678901' }, ['microchip']],
    ['bad microchip (code 000)', { name: 'Chip', species: 'koi', microchip: '000123456789012' }, ['microchip']],
    ['other species without scientific name', { name: 'Tench', species: 'other' }, ['scientificName']],
    ['future hatch year', { name: 'Soon', species: 'koi', hatchYear: 3000 }, ['hatchYear']],
    ['both hatch year and estimated age', { name: 'Both', species: 'koi', hatchYear: 2010, estimatedAgeYears: 5 }, ['estimatedAgeYears']],
    ['smuggled pondId', { name: 'Sneaky', species: 'koi', pondId: randomUUID() }, ['_']],
  ])('refuses %s with field messages and writes nothing', async (_label, body, fields) => {
    const before = await testDb().query('select count(*)::int as n from fish where pond_id = $1', [world.pond.id])
    const response = await client('owner').post(`/api/ponds/${world.pond.id}/fish`, body)
    expect(response.status).toBe(400)
    for (const field of fields) expect(response.body.data.fieldErrors[field], field).toBeDefined()
    const after = await testDb().query('select count(*)::int as n from fish where pond_id = $1', [world.pond.id])
    expect(after.rows[0].n).toBe(before.rows[0].n)
  })

  it('normalises a microchip typed with spaces and keeps it unique among living fish', async () => {
    const chip = testMicrochip()
    const spaced = `${chip.slice(0, 3)} ${chip.slice(3, 9)} ${chip.slice(9)}`
    const first = await client('owner').post(`/api/ponds/${world.pond.id}/fish`, { name: 'Chipped', species: 'koi', microchip: spaced })
    expect(first.status).toBe(201)
    expect(first.body.microchip).toBe(chip)
    const second = await client('keeper').post(`/api/ponds/${world.pond.id}/fish`, { name: 'Twin', species: 'koi', microchip: chip })
    expect(second.status).toBe(409)
    expect(second.body.data.fieldErrors.microchip).toBeDefined()
    const search = await client('vet').get(`/api/ponds/${world.pond.id}/fish?q=${chip.slice(0, 8)}`)
    expect(search.body.map((f: { name: string }) => f.name)).toContain('Chipped')
  })

  it('refuses bad pond input with field messages', async () => {
    const response = await client('owner').post('/api/ponds', { name: '', volumeLitres: -5 })
    expect(response.status).toBe(400)
    expect(Object.keys(response.body.data.fieldErrors).sort()).toEqual(['name', 'volumeLitres'])
    const query = await client('owner').get(`/api/ponds/${world.pond.id}/fish?sort=weight-ish`)
    expect(query.status).toBe(400)
  })
})

describe('fish edits', () => {
  it('keeps a history of changed fields and refuses a stale edit with 409', async () => {
    const fish = (await client('owner').post(`/api/ponds/${world.pond.id}/fish`, { name: 'Edited', species: 'koi', variety: 'Kohaku' })).body
    const keeperEdit = await client('keeper').patch(`/api/fish/${fish.id}`, { variety: 'Sanke', version: fish.version })
    expect(keeperEdit.status).toBe(200)
    expect(keeperEdit.body.version).toBe(fish.version + 1)
    const stale = await client('vet').patch(`/api/fish/${fish.id}`, { variety: 'Showa', version: fish.version })
    expect(stale.status).toBe(409)
    expect(stale.body.message).toMatch(/someone else saved/i)
    const current = (await client('vet').get(`/api/fish/${fish.id}`)).body
    expect(current.variety).toBe('Sanke')
    const history = (await client('owner').get(`/api/fish/${fish.id}/history`)).body
    expect(history).toHaveLength(1)
    expect(history[0]).toMatchObject({ by: 'Keeper', changes: [{ field: 'variety', from: 'Kohaku', to: 'Sanke' }] })
    const noVersion = await client('owner').patch(`/api/fish/${fish.id}`, { variety: 'Showa' })
    expect(noVersion.status).toBe(400)
  })

  it('turns an estimated age into an estimated hatch year', async () => {
    const response = await client('owner').post(`/api/ponds/${world.pond.id}/fish`, { name: 'Old one', species: 'goldfish', estimatedAgeYears: 12 })
    expect(response.body).toMatchObject({ hatchYear: new Date().getFullYear() - 12, hatchYearEstimated: true, ageYears: 12, scientificName: 'Carassius auratus' })
  })
})

// Entries and photos are reached through their fish's pond, by the same membership check as the fish itself:
// each kind of caller gets the same status as for the fish, and a read-only member reads but never writes.
describe('role matrix through a fish: timeline entries and photos', () => {
  type Through = Who | 'readOnly'
  let w: Roles & { readOnly: Awaited<ReturnType<typeof signedInUser>> }
  let entryId: string
  let photoId: string
  beforeAll(async () => {
    const roles = await pondWithRoles()
    const readOnly = await signedInUser({ name: 'Former keeper' })
    await addMember(roles.pond.id, readOnly.user.id, 'keeper')
    await testDb().query('update memberships set read_only = true where pond_id = $1 and user_id = $2', [roles.pond.id, readOnly.user.id])
    w = { ...roles, readOnly }
    entryId = (await addEntry(roles.keeper.client, roles.fish.id, { kind: 'observation', occurredAt: new Date().toISOString(), data: { text: 'Matrix entry' } })).entry.id
    photoId = await insertReadyPhoto(roles.fish.id, roles.keeper.user.id, new Date().toISOString())
  })
  const rows: { route: string, call: (c: ApiClient) => Promise<{ status: number }>, expected: Record<Through, number> }[] = [
    { route: 'GET /api/timeline/:entryId/revisions', call: c => c.get(`/api/timeline/${entryId}/revisions`), expected: { owner: 200, keeper: 200, vet: 200, readOnly: 200, outsider: 404, anonymous: 401 } },
    { route: 'GET /api/timeline/:unknown/revisions', call: c => c.get(`/api/timeline/${randomUUID()}/revisions`), expected: { owner: 404, keeper: 404, vet: 404, readOnly: 404, outsider: 404, anonymous: 401 } },
    // The uploader (the keeper) and an owner may caption a photo; a vet who did not take it may not.
    { route: 'PATCH /api/photos/:photoId', call: c => c.patch(`/api/photos/${photoId}`, { caption: 'Matrix' }), expected: { owner: 200, keeper: 200, vet: 403, readOnly: 403, outsider: 404, anonymous: 401 } },
    { route: 'PATCH /api/photos/:unknown', call: c => c.patch(`/api/photos/${randomUUID()}`, { caption: 'Matrix' }), expected: { owner: 404, keeper: 404, vet: 404, readOnly: 404, outsider: 404, anonymous: 401 } },
    // Sent without a reason, so the entry stays as it is: who passes the access and amend checks gets the 400 of the body.
    { route: 'POST /api/timeline/:entryId/entered-in-error', call: c => c.post(`/api/timeline/${entryId}/entered-in-error`, {}), expected: { owner: 400, keeper: 400, vet: 403, readOnly: 403, outsider: 404, anonymous: 401 } },
  ]
  const cases = rows.flatMap(row => (Object.keys(row.expected) as Through[]).map(who => ({ ...row, who, status: row.expected[who] })))
  it.each(cases)('$route as $who answers $status', async ({ call, who, status }) => {
    expect((await call(w[who].client)).status).toBe(status)
  })
})
