import { and, eq, ne } from 'drizzle-orm'
import { enteredInErrorSchema, entryIdParams } from '#shared/utils/timeline-schemas'

export default defineEventHandler(async (event) => {
  const { entryId } = paramsValidated(event, entryIdParams, 'Entry not found')
  const access = await requireEntryAccess(event, entryId)
  const kind = refuseAmend(access)
  const { reason } = await readValidated(event, enteredInErrorSchema)
  const { fish, user, role } = access

  // Bringing a fish back to life can meet a living fish with its microchip number: that is a 409, not a 500.
  await useDb().transaction(async (tx) => {
    await lockFish(tx, fish.id)
    const [entry] = await tx.select().from(schema.timelineEntries).where(eq(schema.timelineEntries.id, entryId)).for('update')
    if (entry!.enteredInError) throw createError({ statusCode: 409, statusMessage: 'Already entered in error', message: 'This entry is already marked entered in error' })
    await tx.update(schema.timelineEntries)
      .set({ enteredInError: true, errorReason: reason, errorById: user.id, errorAt: new Date(), updatedAt: new Date() })
      .where(eq(schema.timelineEntries.id, entryId))
    if (kind === 'death') {
      const [other] = await tx.select({ id: schema.timelineEntries.id }).from(schema.timelineEntries).where(and(
        eq(schema.timelineEntries.fishId, fish.id), eq(schema.timelineEntries.kind, 'death'),
        eq(schema.timelineEntries.enteredInError, false), ne(schema.timelineEntries.id, entryId),
      ))
      if (!other) await syncDeathStatus(tx, fish, user.id, false)
    }
  }).catch((error: unknown) => {
    throw conflictFromUniqueViolation(error) ?? error
  })
  return entryView(entryId, { species: fish.species, userId: user.id, role })
})
