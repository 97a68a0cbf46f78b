import { eq } from 'drizzle-orm'
import { fishIdParams } from '#shared/utils/fish-schemas'
import { entryCreateSchema } from '#shared/utils/timeline-schemas'
import { allAcknowledged } from '#shared/utils/plausibility'

export default defineEventHandler(async (event) => {
  const { fishId } = paramsValidated(event, fishIdParams, 'Fish not found')
  const { user, role, fish } = await requireFishRole(event, fishId)
  await refuseKindOutright(event, role)
  const input = await readValidated(event, entryCreateSchema)
  refuseWrite(role, input.kind, input.data)
  const anaesthesia = input.kind === 'procedure' ? input.anaesthesia : undefined
  if (anaesthesia) refuseWrite(role, 'anaesthesia', anaesthesia)

  const written = await useDb().transaction(async (tx) => {
    await lockFish(tx, fishId)
    // A retried send after a lost answer: the entry it already wrote is the answer.
    if (input.id) {
      const [existing] = await tx.select().from(schema.timelineEntries).where(eq(schema.timelineEntries.id, input.id))
      if (existing) {
        if (existing.fishId !== fishId || existing.authorId !== user.id || existing.kind !== input.kind) {
          throw createError({ statusCode: 409, statusMessage: 'Id in use', message: 'This entry id belongs to another entry' })
        }
        return { status: 'written' as const, entry: existing, linked: existing.linkedEntryId, created: false }
      }
    }
    const occurredAt = new Date(input.occurredAt)
    let data: Record<string, unknown> = input.data
    if (input.kind === 'measurement') {
      // Unusual but possible values are saved only once the author has seen the warning (and it stays with the entry).
      const warnings = await measurementPlausibility(tx, fish, { ...input.data, occurredAt }, user)
      if (!allAcknowledged(warnings, input.acknowledgedWarnings)) return { status: 'unconfirmed' as const, warnings }
      data = { ...input.data, warnings: warnings.length ? warnings : undefined }
    }
    let linked: string | null = null
    if (anaesthesia) {
      const record = await insertEntry(tx, { fish, kind: 'anaesthesia', occurredAt, authorId: user.id, data: anaesthesia })
      linked = record.id
      data = { ...data, anaesthesiaEntryId: record.id }
    }
    data = await resolvePeople(tx, fish, input.kind, data)
    await checkEntryReferences(tx, fish, input.kind, data)
    const entry = await insertEntry(tx, { id: input.id, fish, kind: input.kind, occurredAt, authorId: user.id, data })
    if (input.kind === 'death') await syncDeathStatus(tx, fish, user.id, true)
    return { status: 'written' as const, entry, linked: linked ?? entry.linkedEntryId, created: true }
  })

  if (written.status === 'unconfirmed') {
    setResponseStatus(event, 409, 'Please confirm')
    return unconfirmedWarnings(written.warnings)
  }
  const context = { species: fish.species, userId: user.id, role }
  setResponseStatus(event, written.created ? 201 : 200)
  return {
    entry: await entryView(written.entry.id, context),
    anaesthesia: written.linked ? await entryView(written.linked, context) : null,
  }
})
