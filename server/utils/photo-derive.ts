import { mkdir } from 'node:fs/promises'
import { join } from 'node:path'
import exifr from 'exifr'
import sharp, { type Metadata, type OutputInfo } from 'sharp'
import { DERIVED_SIZES, MAX_INPUT_PIXELS } from '../../shared/utils/photo-limits'
import type { PhotoVariant } from '../db/schema/photos'
import { PhotoRejection, tooManyPixels } from './photo-files'

// Explicit relative imports only (no Nitro auto-imports): scripts/bench/photos.ts times this very code.

// libvips works in libuv's thread pool, off the event loop. One thread per image, with the cap on
// photos processed at once (photo-pipeline.ts), keeps the pool (4 threads, shared with password
// hashing and file I/O) from filling up.
sharp.concurrency(1)
// The operation cache would keep originals open after they are deleted.
sharp.cache(false)

export interface PhotoHeader {
  width: number
  height: number
  /** Upright size, after the EXIF orientation is applied. */
  uprightWidth: number
  uprightHeight: number
  takenAt: Date | null
}

const EXIF_DATE = /^(\d{4}):(\d{2}):(\d{2}) (\d{2}):(\d{2}):(\d{2})/

/**
 * The camera's clock as written in EXIF, stored as if it were UTC: the date on the pond's calendar is
 * what people look for, and most cameras write no time zone.
 */
function parseExifDate(value: unknown): Date | null {
  const match = typeof value === 'string' ? EXIF_DATE.exec(value) : null
  if (!match) return null
  const [, y, mo, d, h, mi, s] = match.map(Number) as number[]
  const date = new Date(Date.UTC(y!, mo! - 1, d!, h!, mi!, s!))
  // A camera whose clock was never set writes 0000:00:00 or 1970 or 2000-01-01; a date ahead of now is wrong too.
  if (Number.isNaN(date.getTime()) || y! < 1990 || date.getTime() > Date.now() + 36 * 3600_000) return null
  return date
}

/** Reads the header only (no pixels are decoded), so a decompression bomb is refused here, before any decode. */
export async function readPhotoHeader(path: string): Promise<PhotoHeader> {
  let metadata: Metadata
  try {
    metadata = await sharp(path, { limitInputPixels: false }).metadata()
  }
  catch {
    throw new PhotoRejection(422, 'The photo file is damaged: its header cannot be read. Upload the photo again from the phone\'s own gallery.')
  }
  const { width = 0, height = 0 } = metadata
  if (!width || !height) throw new PhotoRejection(422, 'The photo file is damaged: it names no picture size. Upload the photo again.')
  if (width * height > MAX_INPUT_PIXELS) throw tooManyPixels(width, height)
  const swapped = (metadata.orientation ?? 1) >= 5
  let takenAt: Date | null = null
  if (metadata.exif && metadata.exif.length > 6) {
    // sharp hands over the APP1 payload; exifr wants it from the TIFF header on, after "Exif\0\0".
    const tags = await exifr.parse(metadata.exif.subarray(6), { pick: ['DateTimeOriginal', 'CreateDate'], reviveValues: false }).catch(() => null)
    takenAt = parseExifDate(tags?.DateTimeOriginal) ?? parseExifDate(tags?.CreateDate)
  }
  return { width, height, uprightWidth: swapped ? height : width, uprightHeight: swapped ? width : height, takenAt }
}

/** Decoder complaints are about the file; anything else (disk, memory) is ours and worth a retry. */
function decodeRejection(error: unknown): PhotoRejection | null {
  const message = error instanceof Error ? error.message : String(error)
  if (/out of memory|unable to allocate|ENOSPC|EIO|EMFILE/i.test(message)) return null
  if (/pixel limit/i.test(message)) return new PhotoRejection(422, `The image has more than ${MAX_INPUT_PIXELS / 1e6} megapixels. Take the photo at the camera's normal size, then upload it again.`)
  if (/premature end|truncat/i.test(message)) {
    return new PhotoRejection(422, 'The photo file is incomplete: it ends before the picture does, so it cannot be shown. Upload the photo again from the phone\'s own gallery.')
  }
  return new PhotoRejection(422, 'The photo file is damaged and cannot be read. Upload the photo again from the phone\'s own gallery.')
}

/** Encoder settings, shared with the benchmark's ImageMagick run so both make the same files. */
export const DERIVED_ENCODING = {
  webp: { quality: 80, effort: 0 },
  jpeg: { quality: 82, progressive: false, optimiseCoding: false },
} as const

/**
 * Decodes once (EXIF orientation applied, at most 2048 px on the long side; libvips shrinks a JPEG while
 * decoding when it is at least twice that), then each smaller size is resized from the one above it,
 * and every size is written as WebP plus a JPEG fallback from the same pixels. sharp writes no metadata
 * unless asked: GPS, camera, dates and the ICC profile (converted to sRGB first) stay behind in the original.
 * WebP effort 0 (of 0-6) and a baseline JPEG: the WebP encoder is most of the time. A/B on the benchmark's
 * 12 MP photo (scripts/bench/photo-ab.ts): effort 2 took about 1.8x as long as effort 0 for files 0-6 % larger
 * or smaller, efforts 3-4 three times as long for nothing smaller; a progressive JPEG scan doubled its encoder's time.
 * The JPEGs keep libjpeg's standard Huffman tables (no optimising pass): the 2048 px one took 12 ms instead of
 * 42 ms for a file 3.5 % larger (fine texture) to 13 % larger (smooth); it is only the fallback beside the WebP.
 */
export async function makeDerived(originalPath: string, outDir: string): Promise<PhotoVariant[]> {
  const largest = DERIVED_SIZES.at(-1)!
  let current: { data: Buffer, info: OutputInfo }
  try {
    current = await sharp(originalPath, { limitInputPixels: MAX_INPUT_PIXELS, failOn: 'error' })
      .rotate()
      .resize(largest, largest, { fit: 'inside', withoutEnlargement: true })
      .toColourspace('srgb')
      .raw({ depth: 'uchar' })
      .toBuffer({ resolveWithObject: true })
  }
  catch (error) {
    const rejection = decodeRejection(error)
    throw rejection ?? error
  }
  await mkdir(outDir, { recursive: true })
  const variants: PhotoVariant[] = []
  const pixels = ({ data, info }: { data: Buffer, info: OutputInfo }) => sharp(data, { raw: { width: info.width, height: info.height, channels: info.channels as 1 | 2 | 3 | 4 } })
  for (const longSide of [...DERIVED_SIZES].reverse()) {
    if (Math.max(current.info.width, current.info.height) > longSide) {
      current = await pixels(current).resize(longSide, longSide, { fit: 'inside' }).raw().toBuffer({ resolveWithObject: true })
    }
    // One output at a time: each holds a thread of the pool while it encodes.
    const webp = await pixels(current).webp(DERIVED_ENCODING.webp).toFile(join(outDir, `${longSide}.webp`))
    // JPEG has no transparency: a PNG or WebP with an alpha channel goes on white.
    const opaque = current.info.channels === 4 || current.info.channels === 2 ? pixels(current).flatten({ background: '#ffffff' }) : pixels(current)
    const jpeg = await opaque.jpeg(DERIVED_ENCODING.jpeg).toFile(join(outDir, `${longSide}.jpg`))
    variants.push({ longSide, width: webp.width, height: webp.height, format: 'webp', bytes: webp.size })
    variants.push({ longSide, width: jpeg.width, height: jpeg.height, format: 'jpeg', bytes: jpeg.size })
  }
  return variants.sort((a, b) => a.longSide - b.longSide)
}
