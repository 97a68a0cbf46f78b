import { z } from 'zod'
import { and, eq } from 'drizzle-orm'
import { memberRoleSchema } from '#shared/utils/pond-schemas'

const params = z.object({ pondId: z.uuid(), userId: z.uuid() })

export default defineEventHandler(async (event) => {
  const { pondId, userId } = paramsValidated(event, params, 'Member not found')
  await requirePondRole(event, pondId, ['owner'])
  const { role } = await readValidated(event, memberRoleSchema)
  const where = and(eq(schema.memberships.pondId, pondId), eq(schema.memberships.userId, userId))
  const [member] = await useDb().select().from(schema.memberships).where(where)
  if (!member) throw createError({ statusCode: 404, statusMessage: 'Member not found' })
  if (member.role === 'owner' && role !== 'owner' && await ownerCount(pondId) <= 1) {
    throw createError({ statusCode: 409, statusMessage: 'A pond needs an owner', message: 'This is the last owner of the pond: make someone else owner first.' })
  }
  // Owners are never read-only: making someone owner gives them back the right to change things.
  await useDb().update(schema.memberships).set({ role, ...(role === 'owner' ? { readOnly: false } : {}), updatedAt: new Date() }).where(where)
  await recordAudit(event, { pondId, action: 'member.role_changed', details: { userId, from: member.role, to: role } })
  return { userId, role }
})
