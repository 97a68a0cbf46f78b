import { expect } from 'vitest'
import { ApiClient } from './client'

// The seeded demo scenario (scripts/seed): invented people who share one password, as README lists them.
export const DEMO_PASSWORD = 'pondside-demo-2026'
export const DEMO = {
  owner: 'helen.marlow@example.com',
  usKeeper: 'tom.marlow@example.com',
  keeper: 'priya.anand@example.com',
  vet: 'ada.okafor@example.com',
  client: 'sam.whitlock@example.com',
} as const

/** An API client signed in as one of the demo people. */
export async function demoClient(email: string) {
  const client = new ApiClient()
  const response = await client.post('/api/auth/sign-in', { email, password: DEMO_PASSWORD })
  expect(response.status).toBe(200)
  return client
}

/** A demo pond by name, as the signed-in person sees it. */
export async function demoPond(client: ApiClient, name: string) {
  const ponds = (await client.get('/api/ponds')).body as { id: string, name: string }[]
  const pond = ponds.find(p => p.name === name)
  if (!pond) throw new Error(`the demo pond ${name} is not visible to this person`)
  return pond
}
