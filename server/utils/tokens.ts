import { createHash, randomBytes } from 'node:crypto'

/** A link token: the raw value goes in the e-mail, only its hash is stored. */
export function newLinkToken() {
  const token = randomBytes(32).toString('base64url')
  return { token, tokenHash: hashLinkToken(token) }
}

export function hashLinkToken(token: string) {
  return createHash('sha256').update(token).digest('hex')
}
