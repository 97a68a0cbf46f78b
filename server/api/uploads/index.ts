// tus uses one URL for several methods (POST creates an upload here; HEAD, PATCH, DELETE and GET act on
// one at /api/uploads/:uploadId), so these handlers take every method and @tus/server tells them
// apart. Its hooks in server/utils/tus.ts authorise each request before anything is read or stored.
export default defineEventHandler(event => handleTusRequest(event))
