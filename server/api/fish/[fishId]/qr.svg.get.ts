import QRCode from 'qrcode'
import { fishIdParams } from '#shared/utils/fish-schemas'

// The QR code on a printed health record: it opens the profile, which only members of the pond can see.
export default defineEventHandler(async (event) => {
  const { fishId } = paramsValidated(event, fishIdParams, 'Fish not found')
  await requireFishRole(event, fishId)
  const svg = await QRCode.toString(`${appOrigin(event)}/fish/${fishId}`, { type: 'svg', errorCorrectionLevel: 'M', margin: 1 })
  setResponseHeaders(event, { 'content-type': 'image/svg+xml', 'cache-control': 'private, max-age=3600', 'x-content-type-options': 'nosniff' })
  return svg
})
