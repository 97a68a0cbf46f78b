// See index.ts: HEAD (where to resume), PATCH (more bytes), DELETE (give up) and GET (refused) for one upload.
export default defineEventHandler(event => handleTusRequest(event))
