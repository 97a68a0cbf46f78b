import { createHash } from 'node:crypto'
import { createReadStream } from 'node:fs'
import { open } from 'node:fs/promises'
import { fileTypeFromFile } from 'file-type'
import { ACCEPTED_TYPES, MAX_INPUT_PIXELS, type AcceptedType } from '../../shared/utils/photo-limits'

/** The file itself is unusable: the client gets this status and message, and nothing of it is kept. */
export class PhotoRejection extends Error {
  constructor(public status: number, message: string) {
    super(message)
    this.name = 'PhotoRejection'
  }
}

const WHAT_TO_UPLOAD = 'Upload the photo as a JPEG, PNG or WebP file.'

const REFUSED_TYPES: Record<string, string> = {
  'image/heic': 'HEIC photos (the iPhone\'s "High Efficiency" format) cannot be used. On the iPhone choose Settings → Camera → Formats → Most Compatible, or share the photo as a JPEG, then upload it again.',
  'image/heif': 'HEIF photos cannot be used. Save or share the photo as a JPEG from the phone, then upload it again.',
  'image/heic-sequence': 'HEIC photo bursts cannot be used. Share a single photo as a JPEG, then upload it again.',
  'image/heif-sequence': 'HEIF photo bursts cannot be used. Share a single photo as a JPEG, then upload it again.',
  'image/avif': 'AVIF images cannot be used yet. ' + WHAT_TO_UPLOAD,
  'image/svg+xml': 'This is an SVG drawing, not a photo. ' + WHAT_TO_UPLOAD,
  'image/gif': 'GIF images cannot be used. ' + WHAT_TO_UPLOAD,
  'image/tiff': 'TIFF images cannot be used. ' + WHAT_TO_UPLOAD,
  'image/bmp': 'BMP images cannot be used. ' + WHAT_TO_UPLOAD,
  'application/pdf': 'This is a PDF document, not a photo. ' + WHAT_TO_UPLOAD,
}

async function readHead(path: string, bytes = 4096) {
  const handle = await open(path, 'r')
  try {
    const buffer = Buffer.alloc(bytes)
    const { bytesRead } = await handle.read(buffer, 0, bytes, 0)
    return buffer.subarray(0, bytesRead)
  }
  finally {
    await handle.close()
  }
}

/** file-type knows binary formats only; text-based ones (SVG, HTML, plain text) are told apart here. */
function describeTextFile(head: Buffer): string | null {
  if (head.includes(0)) return null
  const text = head.toString('utf8').replace(/^\uFEFF/, '').trimStart().toLowerCase()
  if (/^(<\?xml[^>]*>\s*)?(<!--[\s\S]*?-->\s*)*(<!doctype svg[^>]*>\s*)?<svg[\s>]/.test(text) || text.includes('<svg')) return REFUSED_TYPES['image/svg+xml']!
  if (/^(<!--[\s\S]*?-->\s*)*(<!doctype html|<html[\s>]|<head[\s>]|<body[\s>])/.test(text) || text.includes('<html')) {
    return 'This file is a web page (HTML) saved under a photo\'s name, not a photo. ' + WHAT_TO_UPLOAD
  }
  return 'This file holds text, not a photo. ' + WHAT_TO_UPLOAD
}

/** The real type, from the bytes; the name and the browser's claimed type are not trusted. */
export async function sniffPhotoType(path: string, size: number): Promise<AcceptedType> {
  if (size === 0) throw new PhotoRejection(422, 'The file is empty (0 bytes). Pick the photo again from the phone\'s gallery.')
  const detected = await fileTypeFromFile(path)
  if (detected && (ACCEPTED_TYPES as readonly string[]).includes(detected.mime)) return detected.mime as AcceptedType
  if (detected) {
    const known = REFUSED_TYPES[detected.mime]
    if (known) throw new PhotoRejection(415, known)
    if (detected.mime === 'application/xml') throw new PhotoRejection(415, describeTextFile(await readHead(path)) ?? REFUSED_TYPES['image/svg+xml']!)
    throw new PhotoRejection(415, `This file is ${detected.mime.startsWith('image/') ? 'an image' : 'a file'} of type ${detected.mime}, not a photo this app can keep. ${WHAT_TO_UPLOAD}`)
  }
  const text = describeTextFile(await readHead(path))
  throw new PhotoRejection(415, text ?? `This file is not a photo this app can read. ${WHAT_TO_UPLOAD}`)
}

export function tooManyPixels(width: number, height: number) {
  const megapixels = (width * height) / 1e6
  return new PhotoRejection(422, `The image is ${width} × ${height} pixels (${megapixels.toFixed(0)} megapixels); at most ${MAX_INPUT_PIXELS / 1e6} megapixels can be used. Take the photo at the camera's normal size, or make it smaller, then upload it again.`)
}

export async function sha256OfFile(path: string): Promise<string> {
  const hash = createHash('sha256')
  for await (const chunk of createReadStream(path, { highWaterMark: 1024 * 1024 })) hash.update(chunk as Buffer)
  return hash.digest('hex')
}
