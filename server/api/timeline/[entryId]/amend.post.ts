import { eq, sql } from 'drizzle-orm'
import { entryAmendEnvelope, entryIdParams } from '#shared/utils/timeline-schemas'
import { allAcknowledged } from '#shared/utils/plausibility'

export default defineEventHandler(async (event) => {
  const { entryId } = paramsValidated(event, entryIdParams, 'Entry not found')
  const access = await requireEntryAccess(event, entryId)
  const kind = refuseAmend(access)
  const { revision, occurredAt, reason, data: rawData, acknowledgedWarnings } = await readValidated(event, entryAmendEnvelope)
  const checked = validateEntryData(kind, rawData)
  refuseWrite(access.role, kind, checked)
  const { fish, user, role } = access

  const unconfirmed = await useDb().transaction(async (tx) => {
    await lockFish(tx, fish.id)
    const [entry] = await tx.select().from(schema.timelineEntries).where(eq(schema.timelineEntries.id, entryId)).for('update')
    if (entry!.enteredInError) throw createError({ statusCode: 409, statusMessage: 'Entered in error', message: 'This entry is marked entered in error; write a new entry instead' })
    if (entry!.revision !== revision) {
      throw createError({ statusCode: 409, statusMessage: 'Amended by someone else', message: `This entry is now at revision ${entry!.revision}. Reload it, then amend again.` })
    }
    let data: Record<string, unknown> = await resolvePeople(tx, fish, kind, checked)
    await checkEntryReferences(tx, fish, kind, data, entryId)
    const next = entry!.revision + 1
    const when = occurredAt ? new Date(occurredAt) : entry!.occurredAt
    if (kind === 'measurement') {
      // The amended values pass the same plausibility check as a new measurement, against the fish's other entries.
      const warnings = await measurementPlausibility(tx, fish, { ...data, occurredAt: when }, user, entryId)
      if (!allAcknowledged(warnings, acknowledgedWarnings)) return warnings
      data = { ...data, warnings: warnings.length ? warnings : undefined }
    }
    await tx.insert(schema.timelineRevisions).values({ entryId, revision: next, occurredAt: when, data, authorId: user.id, reason })
    await tx.update(schema.timelineEntries)
      .set({ data, occurredAt: when, revision: next, ...mirroredColumns(kind, data), updatedAt: sql`now()` })
      .where(eq(schema.timelineEntries.id, entryId))
    return null
  })
  if (unconfirmed) {
    setResponseStatus(event, 409, 'Please confirm')
    return unconfirmedWarnings(unconfirmed)
  }
  return entryView(entryId, { species: fish.species, userId: user.id, role })
})
