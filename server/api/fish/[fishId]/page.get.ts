import { fishIdParams } from '#shared/utils/fish-schemas'

/**
 * What the fish profile shows when it opens, in one answer, for its server render. Asked for one by one, each part
 * was an inner request through the whole h3 stack (middleware, security headers, compression, request log, JSON
 * written and read again), and each checked access again. Access is decided once here, as each part's own route
 * decides it, and each part is what that route answers (the same functions). The query is the timeline's (the
 * profile asks for its first page).
 */
export default defineEventHandler(async (event) => {
  const { fishId } = paramsValidated(event, fishIdParams, 'Fish not found')
  const access = await requireFishRole(event, fishId)
  const [facts, timeline, residences, photos] = await Promise.all([
    standingFactsOf(fishId), timelinePageOf(event, access), residencesOf(access), photosOf(access),
  ])
  return { fish: toFishProfile(access.fish, access.role, access.pondName, access.readOnly), facts, timeline, residences, photos }
})
