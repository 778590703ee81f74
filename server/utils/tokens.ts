import { createHash, randomBytes } from 'node:crypto'

/** A URL-safe random token and the SHA-256 hex digest that is stored in its place. */
export function newToken() {
  const token = randomBytes(32).toString('base64url')
  return { token, hash: hashToken(token) }
}

export function hashToken(token: string) {
  return createHash('sha256').update(token).digest('hex')
}
