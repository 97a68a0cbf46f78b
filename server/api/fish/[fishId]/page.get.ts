import fishRoute from './index.get'
import factsRoute from './facts.get'
import photosRoute from './photos.get'
import residencesRoute from './residences.get'
import timelineRoute from './timeline/index.get'

/**
 * What the fish profile shows when it opens, in one answer, for its server render. Asked for one by one, each part
 * was an inner request through the whole h3 stack (middleware, security headers, compression, request log, JSON
 * written and read again). Each part is still its own route's handler run on this request, so access is checked
 * and the answer shaped exactly as there. The query is the timeline's (the profile asks for its first page).
 */
export default defineEventHandler(async (event) => {
  const [fish, facts, timeline, residences, photos] = await Promise.all([
    fishRoute(event), factsRoute(event), timelineRoute(event), residencesRoute(event), photosRoute(event),
  ])
  return { fish, facts, timeline, residences, photos }
})
