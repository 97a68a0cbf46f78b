import { pondCreateSchema } from '#shared/utils/pond-schemas'

export default defineEventHandler(async (event) => {
  const user = requireUser(event)
  const input = await readValidated(event, pondCreateSchema)
  const pond = await useDb().transaction(async (tx) => {
    const [created] = await tx.insert(schema.ponds).values({ name: input.name, volumeLitres: input.volumeLitres ?? null, notes: input.notes ?? '' }).returning()
    await tx.insert(schema.memberships).values({ pondId: created!.id, userId: user.id, role: 'owner' })
    return created!
  })
  setResponseStatus(event, 201)
  return pondDetail(pond.id, 'owner')
})
