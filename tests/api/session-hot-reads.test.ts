import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { closeTestDb, testDb } from '../support/db'
import { addMember, pondWithRoles, signedInUser } from '../support/factories'

afterAll(closeTestDb)

// The hot reads check the session row in their access statement (server/db/queries/access.ts), not in the
// session middleware: each must still refuse a revoked, idle or too old session with 401, exactly as /api/me does.
let world: Awaited<ReturnType<typeof pondWithRoles>>
let hotReads: string[]
beforeAll(async () => {
  world = await pondWithRoles()
  const fish = `/api/fish/${world.fish.id}`
  const pond = `/api/ponds/${world.pond.id}`
  hotReads = [fish, `${fish}/growth`, `${fish}/timeline`, `${fish}/timeline?limit=5`, pond, `${pond}/fish`]
})

const statuses = async (client: typeof world.owner.client) => Promise.all(hotReads.map(async path => (await client.get(path)).status))

describe('the session checked inside the hot reads’ access statement', () => {
  it('answers a member 200, an outsider 404 and no cookie 401', async () => {
    expect(await statuses(world.keeper.client)).toEqual(hotReads.map(() => 200))
    expect(await statuses(world.outsider.client)).toEqual(hotReads.map(() => 404))
    expect(await statuses(world.anonymous.client)).toEqual(hotReads.map(() => 401))
  })

  it('refuses a cookie copied before sign-out with 401 on every hot read, and clears it', async () => {
    const { client, user } = await signedInUser()
    await addMember(world.pond.id, user.id, 'keeper')
    const copied = client.copy()
    expect(await statuses(copied)).toEqual(hotReads.map(() => 200))
    expect((await client.post('/api/auth/sign-out')).status).toBe(200)
    const refused = await copied.get(`/api/fish/${world.fish.id}`)
    expect(refused.status).toBe(401)
    // The cookie is emptied on the refusal, as the middleware empties it on every other route.
    expect(refused.headers.get('set-cookie') ?? '').toMatch(/^fintrail-session=;/)
    expect(await statuses(copied)).toEqual(hotReads.map(() => 401))
  })

  it('ends an idle session and one past its absolute lifetime on the hot reads too', async () => {
    const idle = await signedInUser()
    const old = await signedInUser()
    for (const who of [idle, old]) await addMember(world.pond.id, who.user.id, 'vet')
    expect(await statuses(idle.client)).toEqual(hotReads.map(() => 200))
    // The server's limits (nuxt.config.ts sessionIdleSeconds, sessionAbsoluteSeconds): 7 days idle, 30 days in all.
    await testDb().query(`update sessions set last_seen_at = now() - interval '8 days' where user_id = $1`, [idle.user.id])
    await testDb().query(`update sessions set created_at = now() - interval '31 days' where user_id = $1`, [old.user.id])
    expect(await statuses(idle.client)).toEqual(hotReads.map(() => 401))
    expect(await statuses(old.client)).toEqual(hotReads.map(() => 401))
  })

  it('keeps the session’s last-seen time current from a hot read alone', async () => {
    await testDb().query(`update sessions set last_seen_at = now() - interval '2 hours' where user_id = $1 and revoked_at is null`, [world.vet.user.id])
    expect((await world.vet.client.get(`/api/fish/${world.fish.id}/growth`)).status).toBe(200)
    const { rows: [row] } = await testDb().query(`select max(last_seen_at) > now() - interval '1 minute' as fresh from sessions where user_id = $1 and revoked_at is null`, [world.vet.user.id])
    expect(row.fresh).toBe(true)
  })
})
