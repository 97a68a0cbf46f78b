import { randomUUID } from 'node:crypto'
import { rm, writeFile } from 'node:fs/promises'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { eq, inArray } from 'drizzle-orm'
import { pondIdParams } from '#shared/utils/pond-schemas'
import { MAX_UPLOAD_BYTES } from '#shared/utils/photo-limits'
import { IDENTIFY_MAX_CANDIDATES, similarityInWords, type IdentifyResult } from '#shared/utils/which-fish'
import { decodeForFeatures } from '../../../fish-id/decode'
import { PhotoRejection, sniffPhotoType } from '../../../utils/photo-files'

/** Ranks the pond's fish for a photo (multipart field `photo`): an aid for the person to confirm, never an assignment. */
export default defineEventHandler(async (event): Promise<IdentifyResult> => {
  const { pondId } = paramsValidated(event, pondIdParams, 'Pond not found')
  await requirePondRole(event, pondId)
  if (Number(getRequestHeader(event, 'content-length') ?? 0) > MAX_UPLOAD_BYTES + 65_536) {
    throw createError({ statusCode: 413, statusMessage: 'Photo too large', message: `The photo is larger than ${MAX_UPLOAD_BYTES / 1024 / 1024} MB.` })
  }
  const photo = (await readMultipartFormData(event))?.find(part => part.name === 'photo' && part.data.length)
  if (!photo) throw createError({ statusCode: 400, statusMessage: 'No photo', message: 'Choose a photo of the fish.', data: { fieldErrors: { photo: ['Choose a photo of the fish'] } } })

  // The same checks as an upload: the type from the bytes, then a decode that refuses damaged files.
  const scratch = join(tmpdir(), `fintrail-identify-${randomUUID()}`)
  await writeFile(scratch, photo.data)
  let image
  try {
    await sniffPhotoType(scratch, photo.data.length)
    image = await decodeForFeatures(scratch).catch(() => {
      throw new PhotoRejection(422, 'The photo file is damaged and cannot be read. Take or choose the photo again.')
    })
  }
  catch (error) {
    if (error instanceof PhotoRejection) throw createError({ statusCode: error.status, statusMessage: 'Photo refused', message: error.message, data: { fieldErrors: { photo: [error.message] } } })
    throw error
  }
  finally {
    await rm(scratch, { force: true })
  }

  const references = await pondReferences(pondId)
  if (!references.length) {
    return { candidates: [], referenceCount: 0, reason: 'No fish in this pond has a photo taken from above yet. Add one to each fish (and mark it "from above") so new photos can be compared with them.' }
  }
  let ranked
  try {
    ranked = await rankPondFish(image, references, IDENTIFY_MAX_CANDIDATES)
  }
  catch (error) {
    if (error instanceof NoFishInPhoto) return { candidates: [], referenceCount: references.length, reason: 'No fish stands out from the background in this photo. Take it from above, with the whole fish in the picture.' }
    throw error
  }
  const fishRows = ranked.length
    ? await useDb().select({ id: schema.fish.id, name: schema.fish.name, variety: schema.fish.variety, weightG: schema.fishMeasurementSummary.weightG })
        .from(schema.fish).leftJoin(schema.fishMeasurementSummary, eq(schema.fishMeasurementSummary.fishId, schema.fish.id))
        .where(inArray(schema.fish.id, ranked.map(r => r.fishId)))
    : []
  const byId = new Map(fishRows.map(row => [row.id, row]))
  return {
    candidates: ranked.map(r => ({
      fishId: r.fishId, name: byId.get(r.fishId)?.name ?? '', score: Math.round(r.score * 1000) / 1000, referencePhotoId: r.referencePhotoId,
      variety: byId.get(r.fishId)?.variety ?? '', latestWeightG: byId.get(r.fishId)?.weightG ?? null, similarity: similarityInWords(r.score),
    })),
    referenceCount: references.length,
  }
})
