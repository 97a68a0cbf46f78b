import { pondIdParams } from '#shared/utils/pond-schemas'
import { visitCreateSchema } from '#shared/utils/visits'

/** A vet opens a visit; what they record at this pond until they close it is linked to it. */
export default defineEventHandler(async (event) => {
  const { pondId } = paramsValidated(event, pondIdParams, 'Pond not found')
  const { user } = await requirePondRole(event, pondId, ['vet'])
  const input = await readValidated(event, visitCreateSchema)
  const visit = await useDb().transaction(async (tx) => {
    if (await openVisitId(tx, pondId, user.id)) {
      throw createError({ statusCode: 409, statusMessage: 'A visit is open', message: 'You already have an open visit at this pond: close it first' })
    }
    const [row] = await tx.insert(schema.visits).values({ pondId, vetId: user.id, visitedOn: input.visitedOn, purpose: input.purpose }).returning()
    await setFishSeen(tx, row!, input.fishSeen)
    return row!
  })
  setResponseStatus(event, 201)
  return { visit: await visitView(visit) }
})
