import { eq } from 'drizzle-orm'
import { visitIdParams, visitUpdateSchema } from '#shared/utils/visits'

/** While the visit is open its vet ticks fish seen, changes the purpose and drafts findings. */
export default defineEventHandler(async (event) => {
  const { pondId, visitId } = paramsValidated(event, visitIdParams, 'Visit not found')
  const { user } = await requirePondRole(event, pondId, ['vet'])
  const input = await readValidated(event, visitUpdateSchema)
  const visit = await useDb().transaction(async (tx) => {
    const current = await visitOfPond(pondId, visitId, tx)
    refuseUnlessOpenVisitOf(current, user.id)
    const changes = { ...(input.purpose ? { purpose: input.purpose } : {}), ...(input.findings !== undefined ? { findings: input.findings } : {}) }
    const [row] = Object.keys(changes).length ? await tx.update(schema.visits).set(changes).where(eq(schema.visits.id, visitId)).returning() : [current]
    if (input.fishSeen) await setFishSeen(tx, row!, input.fishSeen)
    return row!
  })
  return { visit: await visitView(visit) }
})
