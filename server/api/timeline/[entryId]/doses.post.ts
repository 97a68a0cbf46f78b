import { and, eq } from 'drizzle-orm'
import { doseGivenSchema, entryIdParams } from '#shared/utils/timeline-schemas'
import { doseDecision } from '#shared/utils/timeline-rules'

// Ticks off one dose of a treatment course as given, by the person asking.
export default defineEventHandler(async (event) => {
  const { entryId } = paramsValidated(event, entryIdParams, 'Entry not found')
  const { user, role, fish, entry } = await requireEntryAccess(event, entryId)
  const decision = doseDecision(role)
  if (!decision.allowed) throw createError({ statusCode: 403, statusMessage: 'Not allowed', message: decision.message })
  const input = await readValidated(event, doseGivenSchema)
  if (entry.kind !== 'treatment') throw badEntry({ _: ['Only a treatment course has doses to check off'] }, 'Only a treatment course has doses to check off')
  const doseCount = typeof entry.data.doseCount === 'number' ? entry.data.doseCount : 0
  if (input.doseNumber > doseCount) {
    const message = doseCount ? `This course has ${doseCount} dose${doseCount === 1 ? '' : 's'}` : 'This treatment was recorded without a number of doses'
    throw badEntry({ doseNumber: [message] }, message)
  }

  const written = await useDb().transaction(async (tx) => {
    await lockFish(tx, fish.id)
    const [current] = await tx.select({ enteredInError: schema.timelineEntries.enteredInError }).from(schema.timelineEntries).where(eq(schema.timelineEntries.id, entryId))
    // A retried send after a lost answer: the dose it already recorded is the answer (before the other checks,
    // which that first send has changed).
    if (input.id) {
      const [existing] = await tx.select().from(schema.treatmentDoses).where(eq(schema.treatmentDoses.id, input.id))
      if (existing) {
        if (existing.entryId !== entryId || existing.givenById !== user.id || existing.doseNumber !== input.doseNumber) {
          throw createError({ statusCode: 409, statusMessage: 'Id in use', message: 'This dose id belongs to another dose' })
        }
        return { row: existing, created: false }
      }
    }
    if (current!.enteredInError) throw createError({ statusCode: 409, statusMessage: 'Entered in error', message: 'This treatment is marked entered in error' })
    const [given] = await tx.select({ givenAt: schema.treatmentDoses.givenAt }).from(schema.treatmentDoses)
      .where(and(eq(schema.treatmentDoses.entryId, entryId), eq(schema.treatmentDoses.doseNumber, input.doseNumber)))
    if (given) throw createError({ statusCode: 409, statusMessage: 'Already given', message: `Dose ${input.doseNumber} is already recorded as given`, data: { fieldErrors: { doseNumber: ['Already recorded as given'] } } })
    const [row] = await tx.insert(schema.treatmentDoses).values({
      id: input.id, entryId, doseNumber: input.doseNumber, givenAt: input.givenAt ? new Date(input.givenAt) : new Date(), givenById: user.id, note: input.note,
    }).returning()
    return { row: row!, created: true }
  })
  setResponseStatus(event, written.created ? 201 : 200)
  const dose = written.row
  return {
    dose: { doseNumber: dose.doseNumber, givenAt: dose.givenAt.toISOString(), givenBy: { id: user.id, name: user.name }, note: dose.note },
    entry: await entryView(entryId, { species: fish.species, userId: user.id, role }),
  }
})
