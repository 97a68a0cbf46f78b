// Limits shared by the uploader in the browser and the server that checks them again.

/** 40 MB: a 12-megapixel phone JPEG is 3-12 MB, a 50-megapixel one up to about 25 MB. */
export const MAX_UPLOAD_BYTES = 40 * 1024 * 1024

/** Pixels decoded at most per image: a 108-megapixel phone sensor fits, a decompression bomb does not. */
export const MAX_INPUT_PIXELS = 120_000_000

/** The formats kept as photos; HEIC is refused because browsers cannot show it and it needs a patent-encumbered decoder. */
export const ACCEPTED_TYPES = ['image/jpeg', 'image/png', 'image/webp'] as const
export type AcceptedType = typeof ACCEPTED_TYPES[number]
export const ACCEPTED_EXTENSIONS = ['.jpg', '.jpeg', '.png', '.webp'] as const

/** Long side, in pixels, of each derived copy: gallery tile, large view on a phone, large view on a desk screen. */
export const DERIVED_SIZES = [320, 1024, 2048] as const
export type DerivedSize = typeof DERIVED_SIZES[number]
export const DERIVED_FORMATS = ['webp', 'jpg'] as const
export type DerivedFormat = typeof DERIVED_FORMATS[number]

/** Bytes per tus PATCH: small enough to finish on a weak signal, large enough to keep overhead low. */
export const UPLOAD_CHUNK_BYTES = 5 * 1024 * 1024

/** A removed photo can be brought back for this many days; then it is deleted for good. */
export const RECOVERABLE_DAYS = 30

/** An unfinished upload can be resumed for this long; then its bytes are deleted. */
export const UPLOAD_EXPIRY_HOURS = 48

/** Photos processed at once on the server (each decode of a 12-megapixel photo holds about 36 MB). */
export const PHOTO_PROCESSING_CONCURRENCY = 2
