import { z } from 'zod'
import { and, eq } from 'drizzle-orm'

const params = z.object({ pondId: z.uuid(), userId: z.uuid() })

export default defineEventHandler(async (event) => {
  const { pondId, userId } = paramsValidated(event, params, 'Member not found')
  await requirePondRole(event, pondId, ['owner'])
  const where = and(eq(schema.memberships.pondId, pondId), eq(schema.memberships.userId, userId))
  const [member] = await useDb().select().from(schema.memberships).where(where)
  if (!member) throw createError({ statusCode: 404, statusMessage: 'Member not found' })
  if (member.role === 'owner' && await ownerCount(pondId) <= 1) {
    throw createError({ statusCode: 409, statusMessage: 'A pond needs an owner', message: 'The last owner cannot be removed.' })
  }
  await useDb().delete(schema.memberships).where(where)
  await recordAudit(event, { pondId, action: 'member.removed', details: { userId, role: member.role } })
  return { ok: true }
})
