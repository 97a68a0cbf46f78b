import { z } from 'zod'
import { and, eq } from 'drizzle-orm'
import { memberReadOnlySchema } from '#shared/utils/custody-schemas'

const params = z.object({ pondId: z.uuid(), userId: z.uuid() })

/** An owner lets a read-only member (kept on after a handover) make changes again, or makes a member read-only. */
export default defineEventHandler(async (event) => {
  const { pondId, userId } = paramsValidated(event, params, 'Member not found')
  await requirePondRole(event, pondId, ['owner'])
  const { readOnly } = await readValidated(event, memberReadOnlySchema)
  const where = and(eq(schema.memberships.pondId, pondId), eq(schema.memberships.userId, userId))
  const [member] = await useDb().select().from(schema.memberships).where(where)
  if (!member) throw createError({ statusCode: 404, statusMessage: 'Member not found' })
  if (member.role === 'owner' && readOnly) {
    throw createError({ statusCode: 409, statusMessage: 'Owners are never read-only', message: 'Make this owner a keeper or vet first.' })
  }
  await useDb().update(schema.memberships).set({ readOnly, updatedAt: new Date() }).where(where)
  await recordAudit(event, { pondId, action: 'member.read_only_changed', details: { userId, readOnly } })
  return { userId, readOnly }
})
