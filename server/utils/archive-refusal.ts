/** Refusals of an archive: 400 with the reason, nothing written. */
export function archiveRefused(reason: string, statusCode = 400) {
  return createError({ statusCode, statusMessage: 'Archive refused', message: `The archive was refused: ${reason}. Nothing was imported.`, data: { fieldErrors: { archive: [reason] } } })
}
