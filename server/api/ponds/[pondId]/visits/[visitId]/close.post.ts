import { and, eq, inArray, isNull } from 'drizzle-orm'
import { VISIT_PURPOSE_LABELS, visitCloseSchema, visitIdParams } from '#shared/utils/visits'
import { formatDay } from '#shared/utils/dates'

/** Closing a visit ends the linking and mails its summary to the pond's owners and keepers, through the outbox. */
export default defineEventHandler(async (event) => {
  const { pondId, visitId } = paramsValidated(event, visitIdParams, 'Visit not found')
  const { user } = await requirePondRole(event, pondId, ['vet'])
  const { findings } = await readValidated(event, visitCloseSchema)
  const now = serverNow(event)
  const result = await useDb().transaction(async (tx) => {
    const [closed] = await tx.update(schema.visits).set({ findings, closedAt: new Date() })
      .where(and(eq(schema.visits.id, visitId), eq(schema.visits.pondId, pondId), eq(schema.visits.vetId, user.id), isNull(schema.visits.closedAt)))
      .returning()
    if (!closed) refuseUnlessOpenVisitOf(await visitOfPond(pondId, visitId, tx), user.id)
    const summary = await visitSummary(closed!, now)
    // Members only, and only those who care for the pond now (not read-only ones kept on after a handover).
    const recipients = await tx.select({ email: schema.users.email }).from(schema.memberships)
      .innerJoin(schema.users, eq(schema.users.id, schema.memberships.userId))
      .where(and(eq(schema.memberships.pondId, pondId), inArray(schema.memberships.role, ['owner', 'keeper']), eq(schema.memberships.readOnly, false)))
    const subject = `${VISIT_PURPOSE_LABELS[summary.purpose]} at ${summary.pondName}, ${formatDay(summary.visitedOn)}: summary`
    const text = visitMailText(summary, `${appOrigin(event)}/ponds/${pondId}/visits/${visitId}`)
    for (const { email } of recipients) await queueMail(tx, { to: email, subject, text, kind: 'visit-summary', subjectType: 'visit', subjectId: visitId })
    return { visit: summary, mailedTo: recipients.length }
  })
  return result
})
