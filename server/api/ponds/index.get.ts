export default defineEventHandler(async (event) => {
  const user = requireUser(event)
  return listPondsOf(user.id)
})
