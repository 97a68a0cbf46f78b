import { eq } from 'drizzle-orm'
import { pondIdParams } from '#shared/utils/pond-schemas'
import { fishCreateSchema, hatchYearFrom, SCIENTIFIC_NAMES } from '#shared/utils/fish-schemas'

export default defineEventHandler(async (event) => {
  const { pondId } = paramsValidated(event, pondIdParams, 'Pond not found')
  const { role } = await requirePondRole(event, pondId, ['owner', 'keeper'])
  const { estimatedAgeYears, hatchYear, ...input } = await readValidated(event, fishCreateSchema)
  const scientificName = input.species === 'other' ? input.scientificName! : SCIENTIFIC_NAMES[input.species]
  try {
    const [created] = await useDb().insert(schema.fish).values({
      ...input, pondId, scientificName, ...hatchYearFrom({ hatchYear, estimatedAgeYears }),
    }).returning()
    const [pond] = await useDb().select({ name: schema.ponds.name }).from(schema.ponds).where(eq(schema.ponds.id, pondId))
    setResponseStatus(event, 201)
    return toFishProfile(created!, role, pond!.name)
  }
  catch (error) {
    throw conflictFromUniqueViolation(error) ?? error
  }
})
