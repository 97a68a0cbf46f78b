import { and, eq } from 'drizzle-orm'
import { fishIdParams, fishUpdateSchema, hatchYearFrom, SCIENTIFIC_NAMES } from '#shared/utils/fish-schemas'
import { ENTRY_RULES, mayChangeFishStatus } from '#shared/utils/timeline-rules'

export default defineEventHandler(async (event) => {
  const { fishId } = paramsValidated(event, fishIdParams, 'Fish not found')
  const { fish, role, user } = await requireFishRole(event, fishId)
  const { version, estimatedAgeYears, hatchYear, ...input } = await readValidated(event, fishUpdateSchema)
  // Sending the status it already has is no change (the edit form sends every field).
  if (input.status !== undefined && input.status !== fish.status && !mayChangeFishStatus(role)) {
    const message = `The status follows from death entries and moves: only ${ENTRY_RULES.death.roles.join(' or ')} members of the pond can change it`
    throw createError({ statusCode: 403, statusMessage: 'Forbidden', message, data: { fieldErrors: { status: [message] } } })
  }
  const species = input.species ?? fish.species
  const next: Partial<typeof schema.fish.$inferInsert> = { ...input, ...hatchYearFrom({ hatchYear, estimatedAgeYears }) }
  if (species !== 'other') next.scientificName = SCIENTIFIC_NAMES[species]
  else if (!input.scientificName && fish.species !== 'other') {
    throw createError({ statusCode: 400, statusMessage: 'Invalid input', data: { fieldErrors: { scientificName: ['Give the scientific name for other species'] } } })
  }
  const changes = Object.entries(next)
    .filter(([field, value]) => value !== undefined && fish[field as keyof typeof fish] !== value)
    .map(([field, to]) => ({ field, from: fish[field as keyof typeof fish] ?? null, to }))
  try {
    const updated = await useDb().transaction(async (tx) => {
      // Only the version the editor saw may be replaced: someone else's save in between means 409.
      const [row] = await tx.update(schema.fish).set({ ...next, version: version + 1, updatedAt: new Date() })
        .where(and(eq(schema.fish.id, fishId), eq(schema.fish.version, version))).returning()
      if (!row) return null
      if (changes.length) await tx.insert(schema.fishEdits).values({ fishId, userId: user.id, changes })
      return row
    })
    if (!updated) {
      throw createError({ statusCode: 409, statusMessage: 'Edited by someone else', message: 'Someone else saved this fish after you opened it. Reload to see their changes, then edit again.' })
    }
    const [pond] = await useDb().select({ name: schema.ponds.name }).from(schema.ponds).where(eq(schema.ponds.id, updated.pondId))
    return toFishProfile(updated, role, pond!.name)
  }
  catch (error) {
    throw conflictFromUniqueViolation(error) ?? error
  }
})
