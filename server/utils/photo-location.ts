import exifr from 'exifr'
import piexif from 'piexifjs'
import sharp from 'sharp'

// GPS tags, and the place names IPTC and XMP can carry (city, state, country, sub-location, location shown or created).
const LOCATION_TAG = /^(gps|latitude$|longitude$|city$|sub-?location|province|state$|country|location)/i

/** Whether the picture says where it was taken: GPS in EXIF or XMP, or a place in IPTC or XMP. */
export async function hasLocation(bytes: Buffer) {
  const tags = await exifr.parse(bytes, { tiff: true, gps: true, xmp: true, iptc: true, ifd1: false, translateValues: false, mergeOutput: true })
    .catch(() => null) as Record<string, unknown> | null | undefined
  return !!tags && hasLocationTag(tags)
}

function hasLocationTag(tags: Record<string, unknown>): boolean {
  return Object.entries(tags).some(([key, value]) => LOCATION_TAG.test(key)
    || (!!value && typeof value === 'object' && !ArrayBuffer.isView(value) && !Array.isArray(value) && hasLocationTag(value as Record<string, unknown>)))
}

/** A JPEG without its EXIF GPS block; every other byte of the picture, the orientation and colour profile stay as they were. */
function jpegWithoutGps(bytes: Buffer) {
  const binary = bytes.toString('binary')
  const exif = piexif.load(binary)
  delete exif.GPS
  if (exif['0th']) {
    // The pointer to the GPS block goes with it.
    const { [piexif.ImageIFD.GPSTag]: _gpsPointer, ...firstIfd } = exif['0th']
    exif['0th'] = firstIfd
  }
  return Buffer.from(piexif.insert(piexif.dump(exif), binary), 'binary')
}

/**
 * Last resort when the place sits where no lossless tool reaches (XMP, IPTC, PNG and WebP chunks):
 * decode and write again at high quality, orientation applied to the pixels and colour profile kept,
 * every other metadata block left behind.
 */
async function reencoded(bytes: Buffer, mime: string) {
  const image = sharp(bytes, { failOn: 'none' }).autoOrient().keepIccProfile()
  if (mime === 'image/png') return image.png().toBuffer()
  if (mime === 'image/webp') return image.webp({ quality: 95 }).toBuffer()
  return image.jpeg({ quality: 95, chromaSubsampling: '4:4:4' }).toBuffer()
}

/**
 * The photo as it goes into an archive: where it was taken removed. Untouched when it holds no place;
 * a JPEG with GPS only in EXIF loses just that block (no re-encoding); anything else is re-encoded.
 */
export async function withoutLocation(bytes: Buffer, mime: string): Promise<Buffer> {
  if (!(await hasLocation(bytes))) return bytes
  if (mime === 'image/jpeg') {
    try {
      const stripped = jpegWithoutGps(bytes)
      if (!(await hasLocation(stripped))) return stripped
    }
    catch {
      // An EXIF block piexifjs cannot parse: fall through to re-encoding.
    }
  }
  return reencoded(bytes, mime)
}
