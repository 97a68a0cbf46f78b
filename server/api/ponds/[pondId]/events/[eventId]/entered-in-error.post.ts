import { and, eq } from 'drizzle-orm'
import { pondEventErrorSchema, pondEventIdParams, isPondTreatment } from '#shared/utils/whole-pond-events'

/** A wrong pond event stays, struck through with the reason: its author may mark it, and an owner one that is not a treatment. */
export default defineEventHandler(async (event) => {
  const { pondId, eventId } = paramsValidated(event, pondEventIdParams, 'Event not found')
  const { user, role } = await requirePondRole(event, pondId)
  const { reason } = await readValidated(event, pondEventErrorSchema)
  const [row] = await useDb().select().from(schema.pondEvents).where(and(eq(schema.pondEvents.id, eventId), eq(schema.pondEvents.pondId, pondId)))
  if (!row) throw createError({ statusCode: 404, statusMessage: 'Event not found' })
  const mayMark = row.authorId === user.id || (role === 'owner' && !isPondTreatment(row.kind))
  if (!mayMark) throw createError({ statusCode: 403, statusMessage: 'Not allowed', message: 'Only its author can mark this pond event entered in error' })
  if (row.enteredInError) throw createError({ statusCode: 409, statusMessage: 'Already marked', message: 'This event is already marked entered in error' })
  await useDb().update(schema.pondEvents).set({ enteredInError: true, errorReason: reason, errorById: user.id, errorAt: new Date() })
    .where(eq(schema.pondEvents.id, eventId))
  const [view] = await pondEventViews(pondId, { eventId })
  return { event: view }
})
