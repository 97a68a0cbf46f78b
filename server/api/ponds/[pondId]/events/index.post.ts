import { and, eq } from 'drizzle-orm'
import { pondIdParams } from '#shared/utils/pond-schemas'
import { pondEventCreateSchema, pondEventDecision, pondEventWarnings, isPondTreatment } from '#shared/utils/whole-pond-events'

export default defineEventHandler(async (event) => {
  const { pondId } = paramsValidated(event, pondIdParams, 'Pond not found')
  const { user, role } = await requirePondRole(event, pondId)
  const input = await readValidated(event, pondEventCreateSchema)
  const decision = pondEventDecision(role, input.kind, input.data)
  if (!decision.allowed) {
    throw createError({ statusCode: decision.status ?? 403, statusMessage: 'Not allowed', message: decision.message, data: { fieldErrors: decision.field ? { [decision.field]: [decision.message] } : {} } })
  }
  const data: Record<string, unknown> = { ...input.data }
  delete data.instructedBy // written here from the id, never taken from the body
  if (typeof data.instructedById === 'string') {
    const vet = await vetOfPond(pondId, data.instructedById)
    if (!vet) throw badEntry({ 'data.instructedById': ['Choose one of the pond’s vets'] })
    data.instructedBy = vet.name
  }
  const [pond] = await useDb().select({ volumeLitres: schema.ponds.volumeLitres }).from(schema.ponds).where(eq(schema.ponds.id, pondId))
  const volumeLitres = input.volumeLitres ?? pond?.volumeLitres ?? null
  if (isPondTreatment(input.kind) && !volumeLitres) {
    throw badEntry({ volumeLitres: ['Give the volume of water treated: the amount depends on it'] })
  }
  const warnings = pondEventWarnings(input.kind, input.data, volumeLitres)
  if (warnings.length && !input.confirmUnusual) {
    throw createError({
      statusCode: 409, statusMessage: 'Please confirm', message: 'Some values are unusual: check them, then save again to confirm.',
      data: { warnings, needsConfirmation: true },
    })
  }

  const saved = await useDb().transaction(async (tx) => {
    // A retried send after a lost answer: the event it already wrote is the answer.
    if (input.id) {
      const [existing] = await tx.select().from(schema.pondEvents).where(eq(schema.pondEvents.id, input.id))
      if (existing) {
        if (existing.pondId !== pondId || existing.authorId !== user.id) throw createError({ statusCode: 409, statusMessage: 'Id in use' })
        return { id: existing.id, created: false }
      }
    }
    const [row] = await tx.insert(schema.pondEvents).values({
      ...(input.id ? { id: input.id } : {}),
      pondId, kind: input.kind, occurredAt: new Date(input.occurredAt), authorId: user.id,
      visitId: await openVisitId(tx, pondId, user.id), volumeLitres, data,
    }).returning({ id: schema.pondEvents.id })
    return { id: row!.id, created: true }
  })
  setResponseStatus(event, saved.created ? 201 : 200)
  const [view] = await pondEventViews(pondId, { eventId: saved.id })
  return { event: view }
})

/** A vet of this pond (read-only ones included: an earlier instruction stays traceable), or undefined. */
async function vetOfPond(pondId: string, userId: string) {
  const [vet] = await useDb().select({ name: schema.users.name }).from(schema.memberships)
    .innerJoin(schema.users, eq(schema.users.id, schema.memberships.userId))
    .where(and(eq(schema.memberships.pondId, pondId), eq(schema.memberships.userId, userId), eq(schema.memberships.role, 'vet')))
  return vet
}
