import sharp from 'sharp'
import { MAX_INPUT_PIXELS } from '../../shared/utils/photo-limits'
import type { RgbImage } from './features'

/** Long side, in pixels, of the picture features are taken from: a fish from above needs no more. */
export const FEATURE_PICTURE_SIZE = 480

/** Decodes a photo (EXIF orientation applied) into RGB at the feature size; sharp works off the event loop. */
export async function decodeForFeatures(input: Buffer | string): Promise<RgbImage> {
  const { data, info } = await sharp(input, { limitInputPixels: MAX_INPUT_PIXELS, failOn: 'error' })
    .rotate()
    .resize(FEATURE_PICTURE_SIZE, FEATURE_PICTURE_SIZE, { fit: 'inside', withoutEnlargement: true })
    .toColourspace('srgb')
    .removeAlpha()
    .raw({ depth: 'uchar' })
    .toBuffer({ resolveWithObject: true })
  return { data: new Uint8Array(data.buffer, data.byteOffset, data.length), width: info.width, height: info.height }
}
