import { afterAll, describe, expect, it } from 'vitest'
import { closeTestDb, testDb } from '../support/db'
import { pondWithRoles } from '../support/factories'

afterAll(closeTestDb)

async function statusOf(fishId: string) {
  const { rows } = await testDb().query('select status, version from fish where id = $1', [fishId])
  return rows[0] as { status: string, version: number }
}

describe('fish status through the fish edit route', () => {
  it('refuses a keeper changing the status (403, nothing saved), but takes the rest of their edit', async () => {
    const { keeper, fish } = await pondWithRoles()
    for (const status of ['deceased', 'rehomed']) {
      const refused = await keeper.client.patch(`/api/fish/${fish.id}`, { version: 1, status })
      expect(refused.status).toBe(403)
      expect(refused.body.data.fieldErrors.status[0]).toMatch(/death entries and moves/)
    }
    expect(await statusOf(fish.id)).toEqual({ status: 'alive', version: 1 })
    // The edit form sends every field: the unchanged status is not a change.
    const edited = await keeper.client.patch(`/api/fish/${fish.id}`, { version: 1, status: 'alive', variety: 'Showa' })
    expect(edited.status).toBe(200)
    expect(edited.body).toMatchObject({ status: 'alive', variety: 'Showa' })
  })

  it('lets the roles that may write a death entry (owner, vet) set it, as the rule table says', async () => {
    const { owner, vet, fish } = await pondWithRoles()
    expect((await vet.client.patch(`/api/fish/${fish.id}`, { version: 1, status: 'rehomed' })).status).toBe(200)
    expect((await owner.client.patch(`/api/fish/${fish.id}`, { version: 2, status: 'alive' })).status).toBe(200)
    expect(await statusOf(fish.id)).toEqual({ status: 'alive', version: 3 })
  })
})
