import { and, desc, eq, inArray, sql } from 'drizzle-orm'
import type { OutgoingMail } from '../db/schema/mail'

export const MAIL_JOB = 'mail-send'

export interface QueuedMessage {
  to: string
  subject: string
  text: string
  html?: string
  /** What the mail is, for the log and the screens: 'invitation', 'password-reset', ... */
  kind: string
  /** What it is about, so the sender's screen can show its state: e.g. 'invitation' + the invitation's id. */
  subjectType?: string
  subjectId?: string
}

/**
 * Puts a mail in the outbox inside the caller's transaction: the mail exists exactly when the
 * write it announces commits, and the route never waits for SMTP. The `mail-send` job delivers it.
 */
export async function queueMail(tx: Tx, message: QueuedMessage): Promise<OutgoingMail> {
  const [row] = await tx.insert(schema.outgoingMail).values({
    to: message.to, subject: message.subject, text: message.text, html: message.html ?? null,
    kind: message.kind, subjectType: message.subjectType ?? null, subjectId: message.subjectId ?? null,
  }).returning()
  await sendJob(MAIL_JOB, { mailId: row!.id }, { tx })
  return row!
}

/** The job: sends one queued mail and records the outcome; a failure makes pg-boss retry with backoff. */
export async function deliverOutgoingMail(data: { mailId: string }, job: JobContext) {
  const failure = await useDb().transaction(async (tx) => {
    // The row lock keeps a retried or duplicated job from sending the same mail twice at once.
    const [mail] = await tx.select().from(schema.outgoingMail)
      .where(and(eq(schema.outgoingMail.id, data.mailId), eq(schema.outgoingMail.status, 'queued')))
      .for('update', { skipLocked: true })
    if (!mail) return null
    try {
      await sendMail({ to: mail.to, subject: mail.subject, text: mail.text, ...(mail.html ? { html: mail.html } : {}) })
    }
    catch (error) {
      const message = error instanceof Error ? error.message : String(error)
      // Recorded and committed; the error is raised after the commit so the record stays.
      await tx.update(schema.outgoingMail).set({
        attempts: sql`${schema.outgoingMail.attempts} + 1`, lastError: message.slice(0, 500),
        status: job.isLastAttempt ? 'failed' : 'queued', updatedAt: new Date(),
      }).where(eq(schema.outgoingMail.id, mail.id))
      console.error(`[mail] ${mail.kind} mail not sent (attempt ${job.retryCount + 1} of ${job.retryLimit + 1}): ${message}`)
      return message
    }
    await tx.update(schema.outgoingMail).set({
      attempts: sql`${schema.outgoingMail.attempts} + 1`, status: 'sent', sentAt: new Date(), lastError: null, updatedAt: new Date(),
    }).where(eq(schema.outgoingMail.id, mail.id))
    return null
  })
  if (failure) throw new Error(failure)
}

export interface MailState { status: OutgoingMail['status'], attempts: number, lastError: string | null, updatedAt: string }

/** The state of the newest mail about each of the given things (an offer's row ids), for the sender's screen. */
export async function latestMailStates(subjectType: string, subjectIds: string[]): Promise<Map<string, MailState>> {
  const states = new Map<string, MailState>()
  if (!subjectIds.length) return states
  const rows = await useDb().selectDistinctOn([schema.outgoingMail.subjectId], {
    subjectId: schema.outgoingMail.subjectId, status: schema.outgoingMail.status, attempts: schema.outgoingMail.attempts,
    lastError: schema.outgoingMail.lastError, updatedAt: schema.outgoingMail.updatedAt,
  }).from(schema.outgoingMail)
    .where(and(eq(schema.outgoingMail.subjectType, subjectType), inArray(schema.outgoingMail.subjectId, subjectIds)))
    .orderBy(schema.outgoingMail.subjectId, desc(schema.outgoingMail.createdAt))
  for (const row of rows) {
    states.set(row.subjectId!, { status: row.status, attempts: row.attempts, lastError: row.lastError ? 'The mail server could not be reached or refused the message' : null, updatedAt: row.updatedAt.toISOString() })
  }
  return states
}
