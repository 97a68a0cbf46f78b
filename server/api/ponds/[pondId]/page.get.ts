import pondRoute from './index.get'
import dueRoute from './due.get'
import eventsRoute from './events/index.get'
import fishRoute from './fish/index.get'
import visitsRoute from './visits/index.get'

/**
 * What the pond page shows when it opens, in one answer, for its server render: asked for one by one, each part was
 * an inner request through the whole h3 stack. Each part is its own route's handler run on this request, so access
 * is checked and the answer shaped exactly as there. The query is the fish list's.
 */
export default defineEventHandler(async (event) => {
  const [pond, fish, visits, events, due] = await Promise.all([
    pondRoute(event), fishRoute(event), visitsRoute(event), eventsRoute(event), dueRoute(event),
  ])
  return { pond, fish, visits, events, due }
})
