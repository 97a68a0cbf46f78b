import { fishListQuerySchema } from '#shared/utils/fish-schemas'
import { pondIdParams } from '#shared/utils/pond-schemas'

/**
 * What the pond page shows when it opens, in one answer, for its server render: asked for one by one, each part was
 * an inner request through the whole h3 stack that checked access again. Access is decided once here, as each
 * part's own route decides it, and each part is what that route answers (the same functions). The query is the
 * fish list's. The sections below the fish (what is due, vet visits, whole-pond events) are not here: they load
 * from their own routes when the person scrolls near them.
 */
export default defineEventHandler(async (event) => {
  const { pondId } = paramsValidated(event, pondIdParams, 'Pond not found')
  const { role, readOnly } = await requirePondRole(event, pondId)
  const query = await queryValidated(event, fishListQuerySchema)
  const [pond, fish] = await Promise.all([pondDetail(pondId, role, readOnly), listFish(pondId, query)])
  return { pond, fish }
})
