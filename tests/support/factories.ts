import { randomUUID } from 'node:crypto'
import { expect } from 'vitest'
import { ApiClient } from './client'
import { testDb } from './db'

export const TEST_PASSWORD = 'river-stones-and-reeds'

export function uniqueEmail(prefix = 'person') {
  return `${prefix}-${randomUUID().slice(0, 8)}@test.example`
}

/** A test transponder number (country code 999, ISO 11784) that no other test uses. */
export function testMicrochip() {
  const id = Math.floor(Math.random() * 274_877_906_943)
  return `999${String(id).padStart(12, '0')}`
}

export async function signedInUser(overrides: { name?: string, email?: string, password?: string } = {}, headers: Record<string, string> = {}) {
  const client = new ApiClient(undefined, headers)
  const email = overrides.email ?? uniqueEmail()
  const password = overrides.password ?? TEST_PASSWORD
  const response = await client.post('/api/auth/sign-up', { name: overrides.name ?? 'Test Person', email, password })
  expect(response.status, JSON.stringify(response.body)).toBe(201)
  return { client, user: response.body as { id: string, name: string, email: string }, email, password }
}

export async function createPond(client: ApiClient, overrides: Record<string, unknown> = {}) {
  const response = await client.post('/api/ponds', { name: `Pond ${randomUUID().slice(0, 6)}`, volumeLitres: 5000, ...overrides })
  expect(response.status, JSON.stringify(response.body)).toBe(201)
  return response.body as { id: string, name: string }
}

export async function addMember(pondId: string, userId: string, role: 'owner' | 'keeper' | 'vet') {
  await testDb().query('insert into memberships (pond_id, user_id, role) values ($1, $2, $3)', [pondId, userId, role])
}

export async function createFish(client: ApiClient, pondId: string, overrides: Record<string, unknown> = {}) {
  const response = await client.post(`/api/ponds/${pondId}/fish`, { name: `Fish ${randomUUID().slice(0, 6)}`, species: 'koi', variety: 'Kohaku', hatchYear: 2018, ...overrides })
  expect(response.status, JSON.stringify(response.body)).toBe(201)
  return response.body as { id: string, name: string, version: number, pondId: string }
}

/** A pond with one person in each role plus an outsider, all signed in. */
export async function pondWithRoles() {
  const owner = await signedInUser({ name: 'Owner' })
  const keeper = await signedInUser({ name: 'Keeper' })
  const vet = await signedInUser({ name: 'Vet' })
  const outsider = await signedInUser({ name: 'Outsider' })
  const pond = await createPond(owner.client)
  await addMember(pond.id, keeper.user.id, 'keeper')
  await addMember(pond.id, vet.user.id, 'vet')
  const fish = await createFish(owner.client, pond.id)
  return { owner, keeper, vet, outsider, anonymous: { client: new ApiClient() }, pond, fish }
}
