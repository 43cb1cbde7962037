import { createHash, randomBytes } from 'node:crypto'

/** A new random token for an e-mailed link, and the hash that is stored in its place. */
export function newToken(): { token: string; hash: string } {
  const token = randomBytes(32).toString('base64url')
  return { token, hash: hashToken(token) }
}

/** SHA-256 of a link token: only hashes are stored, so a database leak hands out no working links. */
export function hashToken(token: string): string {
  return createHash('sha256').update(token).digest('hex')
}
