import { randomUUID } from 'node:crypto'
import { expect } from 'vitest'
import type { ApiClient } from './client'
import { testDb } from './db'
import { linkIn, receivedAfter, waitForMail } from './mail'

/** The token of the link to `path` ('/handovers/', '/transfers/') mailed to an address since `since`, with a subject containing `subject`. */
export async function tokenFromMail(email: string, subject: string, path: string, since = new Date(0)) {
  const mail = await waitForMail(email, receivedAfter(since, m => m.subject.includes(subject)))
  return new URL(linkIn(mail, path)).pathname.split('/').pop()!
}

export async function offerPond(owner: ApiClient, pondId: string, email: string, membersOption: 'stay' | 'read_only' | 'leave' = 'stay') {
  const since = new Date()
  const response = await owner.post(`/api/ponds/${pondId}/handovers`, { email, membersOption })
  expect(response.status, JSON.stringify(response.body)).toBe(201)
  const token = await tokenFromMail(email, 'offers you the pond', '/handovers/', since)
  return { id: response.body.id as string, token }
}

/** A ready photo row as the photo pipeline leaves it, without going through an upload. */
export async function insertReadyPhoto(fishId: string, uploaderId: string, takenAt: string) {
  const { rows } = await testDb().query(
    `insert into photos (fish_id, uploader_id, upload_id, original_name, state, taken_at, mime, width, height, bytes)
     values ($1, $2, $3, 'koi-from-above.jpg', 'ready', $4, 'image/jpeg', 4000, 3000, 123456) returning id`,
    [fishId, uploaderId, `test-${randomUUID()}`, takenAt])
  return rows[0].id as string
}

export async function membershipOf(pondId: string, userId: string) {
  const { rows } = await testDb().query('select role, read_only from memberships where pond_id = $1 and user_id = $2', [pondId, userId])
  return rows[0] as { role: string, read_only: boolean } | undefined
}

export async function entriesOfKind(fishId: string, kind: string) {
  const { rows } = await testDb().query(
    `select e.id, e.data, e.author_id, e.pond_id, e.occurred_at, (select count(*)::int from timeline_revisions r where r.entry_id = e.id) as revisions
     from timeline_entries e where e.fish_id = $1 and e.kind = $2 order by e.occurred_at`, [fishId, kind])
  return rows as { id: string, data: Record<string, unknown>, author_id: string, pond_id: string, occurred_at: Date, revisions: number }[]
}
